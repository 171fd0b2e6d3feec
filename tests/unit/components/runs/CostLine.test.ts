// The estimate line on the calculation and scan forms warns before submitting a job over the plan's
// per-job compute cap (src/shared/plans.ts maxJobComputeSeconds), which the server refuses.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { CostLine } from "../../../../src/components/runs/CostLine";
import { PLANS } from "../../../../src/shared/plans";

const html = (props: Parameters<typeof CostLine>[0]) => renderToStaticMarkup(createElement(CostLine, props));

describe("CostLine and the per-job cap", () => {
  it("a Free run over 10 compute-minutes shows the refusal and the Lab cap before submit", () => {
    const out = html({ seconds: PLANS.free.maxJobComputeSeconds * 2, plan: "free" });
    expect(out).toContain('data-testid="job-cap"');
    expect(out).toContain("This calculation is estimated at 20.0 compute-minutes, over the Free plan&#x27;s limit of 10.0 compute-minutes per job");
    expect(out).toContain("The Lab plan allows 6.00 compute-hours.");
  });

  it("says what a job costs in the plan's own terms: nothing charged on Free, metered on Lab", () => {
    const free = html({ seconds: 30, plan: "free" });
    expect(free).toContain("Nothing is charged on Free");
    expect(free).not.toContain("You are charged");
    expect(html({ seconds: 30, plan: "lab" })).toContain("You are charged for the compute-seconds actually used.");
  });

  it("a run under the cap shows no warning; the same run on Lab neither", () => {
    expect(html({ seconds: PLANS.free.maxJobComputeSeconds - 1, plan: "free" })).not.toContain("job-cap");
    expect(html({ seconds: PLANS.free.maxJobComputeSeconds * 2, plan: "lab" })).not.toContain("job-cap");
  });

  it("a sweep is judged by its costliest point, not by the sum of its points", () => {
    const points = 100;
    const perPoint = PLANS.free.maxJobComputeSeconds / 10;
    expect(html({ seconds: perPoint * points, plan: "free", points, jobSeconds: perPoint })).not.toContain("job-cap");
    const out = html({ seconds: 2 * PLANS.free.maxJobComputeSeconds * points, plan: "free", points, jobSeconds: 2 * PLANS.free.maxJobComputeSeconds });
    expect(out).toContain("One point is estimated at 20.0 compute-minutes");
  });
});
