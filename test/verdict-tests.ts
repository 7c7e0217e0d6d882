// The repository's own wiring of the team-rule kit into vitest: one test for the rule's shape
// and one per case of its table, each asserting that verifyRule found no problem.
import { describe, expect, it } from "vitest";
import type { RuleVerdict } from "../src/review/tester.js";

export function testsFromVerdict(verdict: RuleVerdict): void {
  describe(`rule ${verdict.rule}`, () => {
    it("has the shape of a rule, and its option defaults validate", () => {
      expect(verdict.shapeProblems).toEqual([]);
    });
    for (const c of verdict.cases) {
      it(c.name, () => {
        expect(c.problems, `case "${c.name}" of ${verdict.rule}`).toEqual([]);
      });
    }
  });
}
