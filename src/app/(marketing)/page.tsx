import Link from "next/link";
import { SiteHeader } from "@/components/shell/SiteHeader";
import { NetworkMotif } from "@/components/shell/NetworkMotif";

const features = [
  {
    title: "Conductance you can cite",
    text:
      "Two-terminal Landauer conductance per valley and in total, in e²/h, siemens and ohms, " +
      "with transmission eigenvalues, Fano factor, temperature smearing and contact resistance.",
  },
  {
    title: "Spectra and densities of states",
    text:
      "Bloch bands of the periodic network at any rational flux, " +
      "densities of states per moiré cell and per area, carrier density, and local density-of-states maps.",
  },
  {
    title: "Scans at scale",
    text: "Grids over energy, field, node probabilities, disorder and size, each point optionally an ensemble of disorder seeds, shared across many workers.",
  },
  {
    title: "Fits to your measurements",
    text:
      "Upload magnetoconductance, read the moiré period off the oscillations, " +
      "and fit node probabilities, mode velocity and contact resistance with honest uncertainties.",
  },
];

export default function LandingPage() {
  return (
    <main className="mx-auto max-w-5xl px-gutter py-16">
      <SiteHeader />

      <section className="mt-20 grid items-center gap-10 lg:grid-cols-[minmax(0,1.3fr)_minmax(0,1fr)]">
        <div>
          <p className="font-mono text-caption uppercase tracking-widest text-accent">chiral scattering networks</p>
          <h1 className="mt-3 text-display font-semibold">Coherent transport through networks of one-way channels.</h1>
          <p className="mt-6 text-lead text-fg-soft">
            Describe a triangular domain-wall network or a square network at the quantum Hall transition. Triskel&apos;s workers compute conductance, spectra
            and densities of states, and hand back plots, tables and files for your paper.
          </p>
          <div className="mt-8 flex gap-4">
            <Link href="/sign-up" className="rounded-full bg-accent px-5 py-2 text-accent-fg hover:bg-accent-strong">
              Start free
            </Link>
            <Link href="/status" className="rounded-full border border-line-strong px-5 py-2 hover:border-accent">
              Service status
            </Link>
          </div>
        </div>
        <figure className="rounded-card border border-line bg-surface p-4">
          <NetworkMotif className="h-auto w-full" />
          <figcaption className="mt-2 text-caption text-fg-faint">
            A 7 × 6 triangular network in one valley: every link carries its mode one way; leads on the left and right.
          </figcaption>
        </figure>
      </section>

      <section className="mt-20 grid gap-6 sm:grid-cols-2">
        {features.map((f) => (
          <article key={f.title} className="rounded-card bg-surface p-6 shadow-sm ring-1 ring-line">
            <h2 className="text-lead font-semibold">{f.title}</h2>
            <p className="mt-2 text-body text-fg-soft">{f.text}</p>
          </article>
        ))}
      </section>

      <p className="mt-16 border-t border-line pt-6 text-caption text-fg-faint">
        Results are predictions of a phenomenological model, not measurements; node probabilities and mode velocity are model parameters to be fitted, not
        material constants. Costs are shown before any job is charged. Nothing here controls instruments.
      </p>
    </main>
  );
}
