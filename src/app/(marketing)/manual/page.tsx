import type { Metadata } from "next";
import katex from "katex";
import "katex/dist/katex.min.css";
import { SiteHeader } from "@/components/shell/SiteHeader";
import { CardTable } from "@/components/ui/Table";
import { PLANS } from "@/shared/plans";
import { CONDUCTANCE_QUANTUM_S, FLUX_QUANTUM_WB, GRAPHENE_LATTICE_NM, periodFromTwistNm, RESISTANCE_QUANTUM_OHM } from "@/engine/constants";
import { sigLatex } from "@/lib/units";

export const metadata: Metadata = {
  title: "Model manual",
  description: "What every Triskel parameter means, its units and range, the conventions and formulas of the chiral network model, and the cautions.",
};

/** Display maths, rendered on the server (no script runs in the browser for it). */
function M({ children, block = false }: { children: string; block?: boolean }) {
  const html = katex.renderToString(children, { displayMode: block, throwOnError: true, output: "htmlAndMathml" });
  return block ? <div className="my-3 overflow-x-auto" dangerouslySetInnerHTML={{ __html: html }} /> : <span dangerouslySetInnerHTML={{ __html: html }} />;
}

interface Param {
  name: string;
  unit: string;
  range: string;
  dflt: string;
  meaning: string;
}

const NETWORK: Param[] = [
  {
    name: "lattice",
    unit: "–",
    range: "triangular | square",
    dflt: "–",
    meaning:
      "Triangular: the domain-wall network of a small-angle twisted bilayer in a displacement field. " +
      "Square: the two-in, two-out network of the quantum Hall transition.",
  },
  {
    name: "size.columns",
    unit: "cells",
    range: "1 – 2000 (plan limit applies)",
    dflt: "–",
    meaning: "Cells along the transport direction a₁, from the left lead to the right lead. A cell is one node with the links that leave it.",
  },
  { name: "size.rows", unit: "cells", range: "1 – 2000; even for a periodic triangular sample", dflt: "–", meaning: "Cells across the sample." },
  {
    name: "transverse",
    unit: "–",
    range: "periodic | open",
    dflt: "periodic",
    meaning:
      "Periodic closes the sample into a cylinder (no edges); " +
      "open leaves two edges where an edge rule sends every current back into the sample, so the whole scattering matrix stays unitary.",
  },
  {
    name: "periodNm",
    unit: "nm",
    range: "1 – 100 000",
    dflt: "– (give this or twistDegrees)",
    meaning: "Link length l: the moiré period of a triangular network; the square network's scale (it has no twist angle).",
  },
  {
    name: "twistDegrees",
    unit: "degrees",
    range: "0.01 – 5",
    dflt: "–",
    meaning: "Triangular network only: twist angle θ, converted to the period with the graphene lattice constant (formula below).",
  },
  {
    name: "modeVelocityMps",
    unit: "m/s",
    range: "10³ – 10⁷",
    dflt: "1.0 × 10⁶",
    meaning:
      "Velocity v of the one-way modes on the links; sets the phase a mode gains per unit energy. " +
      "A model parameter to be fitted; the wall modes are usually slower than the bulk value.",
  },
  {
    name: "channelsPerLink",
    unit: "–",
    range: "1 | 2",
    dflt: "1",
    meaning: "Independent copies of the mode on each link, unless an explicit node matrix mixes them. The square network has one.",
  },
  {
    name: "degeneracy.spin",
    unit: "–",
    range: "1 | 2",
    dflt: "triangular 2, square 1",
    meaning: "Spin copies counted in the total conductance and in densities.",
  },
  {
    name: "degeneracy.valley",
    unit: "–",
    range: "1 | 2",
    dflt: "triangular 2, square 1",
    meaning:
      "Valleys counted (triangular network; the square network has none). Valley K′ is the time-reversed network: links reversed, node matrix transposed, magnetic phases negated.",
  },
  {
    name: "node.forward",
    unit: "probability",
    range: "0 – 1, reachable (see below)",
    dflt: "–",
    meaning: "Probability P_f that an electron arriving at a node goes straight on.",
  },
  { name: "node.left", unit: "probability", range: "0 – 1", dflt: "half of 1 − forward", meaning: "Probability P_l of turning left, by +120°." },
  { name: "node.right", unit: "probability", range: "0 – 1", dflt: "1 − forward − left", meaning: "Probability P_r of turning right, by −120°." },
  { name: "node.branch", unit: "–", range: "+1 | −1", dflt: "+1", meaning: "Which of the two mirror unitary nodes with the same probabilities is used." },
  { name: "node.phaseRad", unit: "rad", range: "−100 – 100", dflt: "0", meaning: "Overall node phase χ; equivalent to a shift of the energy." },
  {
    name: "node.matrix",
    unit: "complex [re, im]",
    range: "3 × 3 (6 × 6 with two channels), unitary to 10⁻⁹",
    dflt: "–",
    meaning: "An explicit node matrix S[m][j] in place of the probabilities.",
  },
  {
    name: "node.turning",
    unit: "probability",
    range: "0 – 1",
    dflt: "–",
    meaning: "Square network: probability p of turning at nodes of one sublattice (1 − p on the other). Critical at p = 1/2.",
  },
  {
    name: "disorder.linkPhaseWidthRad",
    unit: "rad",
    range: "0 – 2π",
    dflt: "0",
    meaning: "Each link gets a random phase, uniform in [−w/2, w/2]; w = 2π is full phase disorder.",
  },
  {
    name: "disorder.forwardSpread",
    unit: "probability",
    range: "0 – 1, must keep every node reachable",
    dflt: "0",
    meaning: "Node-to-node spread of the forward (square: turning) probability, uniform of this width around the mean.",
  },
  {
    name: "disorder.seed",
    unit: "integer",
    range: "0 – 4 294 967 295",
    dflt: "1",
    meaning: "Seed of the disorder generator. The same seed gives the same sample, so every run can be repeated.",
  },
];

const COMPUTATIONS: { kind: string; title: string; params: Param[]; gives: string }[] = [
  {
    kind: "conductance",
    title: "Conductance",
    gives:
      "Conductance per valley (per spin) and in total in e²/h, siemens and ohms; " +
      "transmission eigenvalues; Fano factor; number of lead channels; current-conservation error. " +
      "With an ensemble: mean, standard deviation, standard error and a histogram over seeds.",
    params: [
      {
        name: "energyMeV",
        unit: "meV",
        range: "−10⁵ – 10⁵",
        dflt: "0",
        meaning: "Energy E, measured from the energy where the link phase E·l/(ħv) is zero.",
      },
      { name: "fieldTesla", unit: "T", range: "−1000 – 1000", dflt: "0", meaning: "Perpendicular magnetic field B." },
      { name: "temperatureK", unit: "K", range: "0 – 1000", dflt: "0", meaning: "Temperature of the thermal average (0: none)." },
      { name: "temperaturePoints", unit: "points", range: "2 – 400", dflt: "24", meaning: "Quadrature points of the thermal average." },
      { name: "contactOhms", unit: "Ω", range: "0 – 10⁹", dflt: "0", meaning: "Series contact resistance added to 1/G." },
      {
        name: "ensemble.samples",
        unit: "seeds",
        range: "1 – 100 000 (plan limit applies)",
        dflt: "none",
        meaning: "Number of disorder samples averaged (seeds counted up from disorder.seed).",
      },
      { name: "histogramBins", unit: "bins", range: "1 – 1000", dflt: "20", meaning: "Bins of the ensemble histogram." },
    ],
  },
  {
    kind: "spectrum",
    title: "Band structure",
    gives: "Bloch energies of the periodic network at each k point, each reduced into one energy period [0, 2πħv/l) and sorted; the energy period.",
    params: [
      {
        name: "flux.numerator / flux.denominator",
        unit: "h/e per plaquette",
        range: "p: −1000 – 1000, q: 1 – 64",
        dflt: "0 / 1",
        meaning: "Rational flux p/q per elementary plaquette; the magnetic unit cell is q times larger.",
      },
      {
        name: "kPointsPerNm",
        unit: "1/nm",
        range: "1 – 20 000 points",
        dflt: "path through the zone",
        meaning: "Explicit k points; without them a path through the Brillouin zone is used.",
      },
      { name: "pathPointsPerSegment", unit: "points", range: "1 – 2000", dflt: "24", meaning: "Resolution of the path." },
    ],
  },
  {
    kind: "dos",
    title: "Density of states",
    gives: "Density of states per meV, per moiré cell and per area, and the carrier density, against energy.",
    params: [
      {
        name: "source",
        unit: "–",
        range: "bloch | sample",
        dflt: "bloch",
        meaning: "From the Bloch spectrum on a k-mesh, or from the finite sample by the trace formula.",
      },
      {
        name: "energies.fromMeV / toMeV / points",
        unit: "meV, points",
        range: "points 1 – 20 000",
        dflt: "one period from 0, 200 points",
        meaning: "Energy grid.",
      },
      { name: "broadeningMeV", unit: "meV", range: "10⁻⁶ – 10⁵", dflt: "period / 100", meaning: "Width of the broadening." },
      { name: "kMesh", unit: "points per direction", range: "1 – 1024", dflt: "48", meaning: "Bloch source: k-mesh." },
      { name: "fieldTesla", unit: "T", range: "−1000 – 1000", dflt: "0", meaning: "Sample source: magnetic field." },
    ],
  },
  {
    kind: "ldos",
    title: "Local density of states",
    gives: "The density of states on every link of the finite sample at one energy: the map drawn on the network, to compare with scanning-probe maps.",
    params: [
      { name: "energyMeV", unit: "meV", range: "−10⁵ – 10⁵", dflt: "0", meaning: "Energy." },
      { name: "fieldTesla", unit: "T", range: "−1000 – 1000", dflt: "0", meaning: "Magnetic field." },
      { name: "broadeningMeV", unit: "meV", range: "10⁻⁶ – 10⁵", dflt: "engine default", meaning: "Broadening (the damping η of the trace formula)." },
    ],
  },
  {
    kind: "localization",
    title: "Localization length",
    gives: "Localization length ξ from the decay of ln T along long strips, and Λ = ξ / W.",
    params: [
      { name: "energyMeV, fieldTesla", unit: "meV, T", range: "as above", dflt: "0, 0", meaning: "Energy and field." },
      { name: "ensemble.samples", unit: "seeds", range: "1 – 100 000", dflt: "4", meaning: "Samples averaged in ⟨ln T⟩." },
      { name: "fitFromColumns", unit: "columns", range: "1 – 2000", dflt: "max(rows, columns / 4)", meaning: "First strip length used in the fit." },
    ],
  },
];

function ParamTable({ rows, caption }: { rows: Param[]; caption: string }) {
  return (
    <CardTable className="my-4" caption={caption} columns={["Field", "Unit", "Range", "Default", "Meaning"]}>
      {rows.map((p) => (
        <tr key={p.name} className="border-b border-line align-top last:border-0">
          <td className="whitespace-nowrap px-3 py-2 font-mono text-caption">{p.name}</td>
          <td className="px-3 py-2 text-caption">{p.unit}</td>
          <td className="px-3 py-2 text-caption">{p.range}</td>
          <td className="px-3 py-2 text-caption">{p.dflt}</td>
          <td className="px-3 py-2 text-caption text-fg-soft">{p.meaning}</td>
        </tr>
      ))}
    </CardTable>
  );
}

const TOC = [
  ["model", "The model"],
  ["network", "Describing a network"],
  ["geometry", "Geometry and direction"],
  ["node", "The node and the reachable region"],
  ["phases", "Phases, field and disorder"],
  ["quantities", "What is computed"],
  ["computations", "Computation parameters"],
  ["constants", "Constants"],
  ["cautions", "Cautions"],
];

export default function ManualPage() {
  return (
    <div className="mx-auto max-w-6xl px-gutter py-10">
      <SiteHeader current="/manual" />
      <div className="mt-8 gap-10 lg:grid lg:grid-cols-[13rem_1fr]">
        <nav aria-label="Manual contents" className="hidden lg:block">
          <ol className="sticky top-8 space-y-1.5 text-caption text-fg-soft">
            {TOC.map(([id, t]) => (
              <li key={id}>
                <a href={`#${id}`} className="hover:text-accent">
                  {t}
                </a>
              </li>
            ))}
          </ol>
        </nav>
        <main
          className={
            "min-w-0 max-w-3xl text-body leading-relaxed " +
            "[&_h2]:mt-12 [&_h2]:scroll-mt-6 [&_h2]:text-title [&_h2]:font-semibold [&_h3]:mt-6 [&_h3]:text-lead [&_h3]:font-semibold [&_p]:mt-3"
          }
        >
          <p className="font-mono text-micro uppercase tracking-[0.18em] text-accent">model manual · engine schema v1</p>
          <h1 className="mt-2 text-display font-semibold">How Triskel models a network</h1>
          <p className="text-lead text-fg-soft">Every parameter, its unit and range, the conventions the engine follows and the formulas behind each result.</p>
          <p>
            From a script: the{" "}
            <a href="/manual/api" className="text-accent underline">
              API reference
            </a>{" "}
            lists every endpoint of the REST API.
          </p>

          <aside aria-label="Cautions" className="mt-6 rounded-card border border-warm/40 bg-warm-soft p-4 text-warm">
            <p className="font-semibold">Read results as model predictions.</p>
            <p className="mt-1 !mt-1">
              Results come from a phenomenological model, not from measurements. Node probabilities and the mode velocity are model parameters you fit to data.
              They are not material constants. Every job shows its estimated cost before it is charged.
            </p>
          </aside>

          <p>
            From a script: the command line and the Python client (
            <a className="font-mono text-accent underline" href="/clients/triskel.py">
              /clients/triskel.py
            </a>
            ) are described, with examples, in{" "}
            <a className="text-accent underline" href="/manual/scripts">
              Triskel from a script
            </a>
            .
          </p>

          <h2 id="model">The model</h2>
          <p>
            Electrons travel along the links of a network in one direction only. Along a link a mode picks up a phase. Where links meet, at a node, the mode is
            scattered into the outgoing links by a unitary matrix, so current is conserved. In a small-angle twisted bilayer under a displacement field, the
            links are the domain walls between the two kinds of stacking domain. They meet at the AA-stacked points, and these are the nodes. One valley runs
            every wall one way and the other valley runs it the other way. The square network is the classic model of the quantum Hall plateau transition.
          </p>

          <h2 id="network">Describing a network</h2>
          <p>
            A network is a JSON object. Units are part of every field name. Fields the engine does not know are refused, not ignored. The web form and the API
            check the same schema.
          </p>
          <ParamTable rows={NETWORK} caption="Network fields" />
          <p>
            The plan limits the largest network. Free allows up to {PLANS.free.maxCellsPerSide} × {PLANS.free.maxCellsPerSide} cells and Lab up to{" "}
            {PLANS.lab.maxCellsPerSide} × {PLANS.lab.maxCellsPerSide}.
          </p>

          <h2 id="geometry">Geometry and direction</h2>
          <p>The triangular network has link length l, the moiré period. Its three link directions are</p>
          <M block>
            {String.raw`\mathbf a_1 = l\,(1,0),\qquad \mathbf a_2 = l\left(-\tfrac12,\tfrac{\sqrt3}{2}\right),` +
              String.raw`\qquad \mathbf a_3 = l\left(-\tfrac12,-\tfrac{\sqrt3}{2}\right),\qquad \mathbf a_1+\mathbf a_2+\mathbf a_3 = 0.`}
          </M>
          <p>
            Nodes sit at <M>{String.raw`\mathbf R = n_1\mathbf a_1 + n_2\mathbf a_2`}</M>. In valley K, the link of direction j runs from{" "}
            <M>{String.raw`\mathbf R`}</M> to <M>{String.raw`\mathbf R+\mathbf a_j`}</M>. Valley K′ is the time-reversed network, with every link reversed. The
            network drawing shows the arrows for the valley you choose.
          </p>
          <p>
            The two leads sit on the faces perpendicular to <M>{String.raw`\mathbf a_1`}</M>, on the left and on the right. Sizes are counted in cells, a cell
            being one node with the links that leave it: columns count cells from lead to lead and rows count them across. The scale comes from the twist angle
            through the graphene lattice constant:
          </p>
          <M block>
            {String.raw`l = \frac{a}{2\sin(\theta/2)},\qquad a = ${GRAPHENE_LATTICE_NM}\ \text{nm}` +
              String.raw`\quad(\theta = 0.1^\circ \Rightarrow l \approx ${periodFromTwistNm(0.1).toFixed(0)}\ \text{nm}).`}
          </M>

          <h2 id="node">The node and the reachable region</h2>
          <p>
            The node matrix gives the amplitude <M>{String.raw`S_{mj}`}</M> to leave along <M>{String.raw`\mathbf a_m`}</M> after arriving along{" "}
            <M>{String.raw`\mathbf a_j`}</M>. Going forward keeps the direction (m = j). A left turn is m = j + 1 and a right turn is m = j − 1, both counted
            mod 3:
          </p>
          <M block>{String.raw`P_f = |S_{jj}|^2,\qquad P_l = |S_{j+1,j}|^2,\qquad P_r = |S_{j-1,j}|^2,\qquad P_f+P_l+P_r = 1.`}</M>
          <p>
            A node with three-fold symmetry is circulant, <M>{String.raw`S = s_f\,\mathbb 1 + s_l P + s_r P^2`}</M> with <M>{String.raw`P_{j+1,j} = 1`}</M>. The
            magnitudes are <M>{String.raw`|s_f| = \sqrt{P_f}`}</M> and so on. For S to be unitary, the phases must make
          </p>
          <M block>{String.raw`\bar s_f s_r + \bar s_l s_f + \bar s_r s_l = 0,`}</M>
          <p>
            so the three lengths <M>{String.raw`\sqrt{P_fP_r},\ \sqrt{P_lP_f},\ \sqrt{P_rP_l}`}</M> must close a triangle. Each must be at most the sum of the
            other two. Not every triple passes this test. With equal turning, <M>{String.raw`P_l = P_r`}</M>, the condition reduces to
          </p>
          <M block>{String.raw`P_f \ge \tfrac19 .`}</M>
          {/* prettier-ignore */}
          <p>
            The ternary diagram in the network editor shades the triples that pass. When a triple fails, the editor and the API say which inequality failed.
            They also give the range of forward allowed with the same left : right ratio, and the editor offers the nearest triple that works. For example,
            (0.5, 0.5, 0) has no unitary node at all. Two mirror solutions share the same probabilities, and <span className="font-mono">branch</span> picks
            one. Branch +1 is the one with <M>{String.raw`\operatorname{Im}(s_l s_r \bar s_f^{\,2}) \ge 0`}</M>. The node phase χ multiplies the whole matrix
            by{" "}
            <M>{String.raw`e^{i\chi}`}</M>. Results are compared through quantities that do not depend on the gauge: probabilities, spectra and conductances.
          </p>
          <p>
            The square network has the standard two-in, two-out node. The turning probability is p on one sublattice of nodes and 1 − p on the other. Results
            are symmetric under p → 1 − p, and the transition sits at p = 1/2.
          </p>

          <h2 id="phases">Phases, field and disorder</h2>
          <p>A mode crossing a link picks up the phase</p>
          <M block>{String.raw`\varphi = \frac{E\,l}{\hbar v} + \theta_B + \theta_{\mathrm{dis}} .`}</M>
          <p>
            The first term makes every result periodic in energy, with period <M>{String.raw`2\pi\hbar v/l`}</M>.{" "}
            <M>{String.raw`\theta_B = (e/\hbar)\int \mathbf A\cdot d\mathbf l`}</M> is the magnetic (Peierls) phase. The flux through one elementary triangle is
          </p>
          <M block>{String.raw`\Phi_\triangle = B\,\frac{\sqrt3}{4}\,l^2,`}</M>
          <p>
            so results repeat in field with period <M>{String.raw`h/(e A_\triangle)`}</M>. The disorder phase <M>{String.raw`\theta_{\mathrm{dis}}`}</M> is
            uniform in <M>{String.raw`[-w/2, w/2]`}</M> and comes from a seeded generator, so a run can be repeated exactly.
          </p>

          <h2 id="quantities">What is computed</h2>
          <h3>Conductance</h3>
          <p>
            The two-terminal conductance follows the Landauer formula. The sum runs over valleys and spins and t is the transmission matrix between the leads:
          </p>
          <M block>
            {String.raw`G = \frac{e^2}{h}\sum_{\text{valley, spin}} \operatorname{Tr}\, t^\dagger t = \frac{e^2}{h}\sum_n T_n,` +
              String.raw`\qquad F = \frac{\sum_n T_n(1-T_n)}{\sum_n T_n}.`}
          </M>
          <p>
            The <M>{String.raw`T_n`}</M> are the transmission eigenvalues, and F is the Fano factor. A series contact resistance adds to 1/G. At a finite
            temperature the result is averaged over the derivative of the Fermi function:
          </p>
          <M block>{String.raw`G(T) = \int G(E)\left(-\frac{\partial f}{\partial E}\right) dE .`}</M>
          <p>
            Long samples are composed slice by slice with the star product of scattering matrices, which stays stable where raw transfer matrices would not.
            Each result reports its current-conservation error |R + T − N|, which should stay below 10⁻¹⁰. The total conductance over both valleys satisfies
            G(B) = G(−B).
          </p>
          <h3>Band structure</h3>
          <p>With uniform links, the periodic network has the Bloch operator</p>
          <M block>
            {String.raw`U(\mathbf k) = S\,\operatorname{diag}\!\left(e^{-i\mathbf k\cdot\mathbf a_j}\right),` +
              String.raw`\qquad E_{n,b}(\mathbf k) = \frac{\hbar v}{l}\left(2\pi n - \alpha_b(\mathbf k)\right),`}
          </M>
          <p>
            where <M>{String.raw`e^{i\alpha_b}`}</M> are the eigenvalues of U(k). At a flux p/q per plaquette the magnetic unit cell is q times larger.
          </p>
          <h3>Density of states and carrier density</h3>
          <p>
            For a finite closed network the engine uses the trace formula, with <M>{String.raw`U_\eta = e^{-\eta}U(E)`}</M> and{" "}
            <M>{String.raw`\tau_\ell = l/(\hbar v)`}</M>:
          </p>
          <M block>{String.raw`\rho(E) = \sum_{\ell} \frac{\tau_\ell}{2\pi}\,\operatorname{Re}\left[(1+U_\eta)(1-U_\eta)^{-1}\right]_{\ell\ell}.`}</M>
          <p>
            Each term of the sum is the local density of states on one link, and these terms make the map drawn on the network. Over one energy period the
            density of states per cell integrates to exactly 3 states per channel. The carrier density n(E) is the integral of the density of states, times the
            spin and valley degeneracy, per unit area.
          </p>
          <h3>Localization</h3>
          <p>On long strips of width W the typical transmission decays as</p>
          <M block>{String.raw`\langle \ln T\rangle \simeq -\frac{2L}{\xi},\qquad \Lambda = \frac{\xi}{W}.`}</M>

          <h2 id="computations">Computation parameters</h2>
          {COMPUTATIONS.map((c) => (
            <section key={c.kind} aria-labelledby={`c-${c.kind}`}>
              <h3 id={`c-${c.kind}`}>
                {c.title} <span className="font-mono text-caption text-fg-faint">kind: &quot;{c.kind}&quot;</span>
              </h3>
              <p className="text-fg-soft">{c.gives}</p>
              <ParamTable rows={c.params} caption={`${c.title} parameters`} />
            </section>
          ))}
          <p>
            A scan (API: sweep) varies one or two of these fields, or a network field such as <span className="font-mono">node.forward</span>, over a list of
            values or a range. Scanning forward rescales left and right and keeps their ratio. Each point can be an ensemble of disorder seeds. Scans are
            limited to {PLANS.free.maxSweepPoints} points on Free and {PLANS.lab.maxSweepPoints.toLocaleString("en")} on Lab.
          </p>

          <h2 id="constants">Constants</h2>
          <p>Since the 2019 SI revision, e and h are exact, and so are these (shown to ten significant figures):</p>
          <M block>
            {String.raw`\frac{e^2}{h} \approx ${sigLatex(CONDUCTANCE_QUANTUM_S, 10)}\ \text{S},` +
              String.raw`\qquad \frac{h}{e^2} \approx ${sigLatex(RESISTANCE_QUANTUM_OHM, 10)}\ \Omega,` +
              String.raw`\qquad \frac{h}{e} \approx ${sigLatex(FLUX_QUANTUM_WB, 10)}\ \text{Wb}.`}
          </M>
          <p>
            The graphene lattice constant a = {GRAPHENE_LATTICE_NM} nm is common practice. The default mode velocity, 10⁶ m/s, is a starting point for a fit,
            not a measured value for domain walls.
          </p>

          <h2 id="cautions">Cautions</h2>
          <ul className="mt-3 list-disc space-y-2 pl-5">
            <li>Results are predictions of a phenomenological model, not measurements.</li>
            <li>
              Node probabilities and mode velocity are fitted model parameters, not material constants. A good fit does not by itself show that the model
              describes the device.
            </li>
            <li>
              A calculation (API: run) shows its estimated compute-seconds and cost before it starts. On Lab you are charged for the compute-seconds actually
              used; on Free nothing is charged and they count against the included minutes. Jobs over the plan, the free quota or the spend cap are refused with
              the reason.
            </li>
            <li>Nothing in Triskel controls instruments.</li>
          </ul>
        </main>
      </div>
    </div>
  );
}
