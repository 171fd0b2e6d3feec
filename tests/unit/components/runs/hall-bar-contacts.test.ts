// The Hall bar contacts editor's own checks (the engine refuses the same inputs, naming the field:
// tests/unit/engine/hall-bar.test.ts).
import { describe, expect, it } from "vitest";
import { contactProblems, defaultBar } from "@/components/runs/HallBarContacts";
import { defaultContacts } from "@/engine/compute/hall-bar";

describe("Hall bar contacts in the form", () => {
  it("the default is the engine's six-terminal bar, and it has no problems", () => {
    expect(defaultBar(10)).toEqual(defaultContacts(10));
    expect(contactProblems(defaultBar(10), 10)).toEqual([]);
  });
  it("names overlaps, out-of-range and reversed windows, bad and taken names in words", () => {
    const c = (name: string, edge: "top" | "bottom", fromColumn: number, toColumn: number) => ({ name, edge, fromColumn, toColumn });
    expect(contactProblems([c("a", "top", 2, 4), c("b", "top", 4, 5)], 10)).toEqual(["b overlaps a on the top edge."]);
    expect(contactProblems([c("a", "top", 2, 4), c("b", "bottom", 4, 5)], 10)).toEqual([]);
    expect(contactProblems([c("a", "top", 8, 10)], 10)).toEqual(["a: columns must be whole numbers from 0 to 9."]);
    expect(contactProblems([c("a", "top", 5, 3)], 10)).toEqual(["a: the window ends before it starts."]);
    expect(contactProblems([c("source", "top", 1, 1)], 10)).toEqual(["source: the name is taken by a lead."]);
    expect(contactProblems([c("x y", "top", 1, 1)], 10)[0]).toMatch(/letters, digits/);
    expect(contactProblems([c("a", "top", 1, 1), c("a", "bottom", 1, 1)], 10)).toEqual(["a: the name is taken."]);
  });
});
