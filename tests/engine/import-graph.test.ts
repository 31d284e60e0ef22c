import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";

// The engine's modules must not import each other in a circle (type-only imports included: a cycle
// of types still ties two files together for a reader). A depth-first search over the relative
// imports of app/engine and workers; a new cycle fails here with its path.
const ROOT = join(__dirname, "..", "..");
const DIRS = ["app/engine", "workers"];

function graph(): Map<string, string[]> {
  const g = new Map<string, string[]>();
  for (const dir of DIRS) {
    for (const f of readdirSync(join(ROOT, dir)).filter((n) => /\.tsx?$/.test(n))) {
      const file = `${dir}/${f}`;
      const text = readFileSync(join(ROOT, file), "utf8");
      const deps = [...text.matchAll(/(?:^|\n)\s*(?:import|export)\s[^;]*?from\s+"(\.{1,2}\/[^"]+)"/g)].map((m) => {
        const parts = [...dir.split("/"), ...m[1].split("/")];
        const out: string[] = [];
        for (const p of parts) if (p === "..") out.pop(); else if (p !== ".") out.push(p);
        const base = out.join("/");
        return /\.tsx?$/.test(base) ? base : `${base}.ts`;
      });
      g.set(file, deps);
    }
  }
  return g;
}

/** Every cycle found by a depth-first search (each reported once, from where the search met it). */
function cycles(g: Map<string, string[]>): string[][] {
  const state = new Map<string, 1 | 2>();
  const stack: string[] = [];
  const found: string[][] = [];
  const visit = (n: string) => {
    state.set(n, 1);
    stack.push(n);
    for (const d of g.get(n) ?? []) {
      if (!g.has(d)) continue;
      if (state.get(d) === 1) found.push([...stack.slice(stack.indexOf(d)), d]);
      else if (!state.has(d)) visit(d);
    }
    stack.pop();
    state.set(n, 2);
  };
  for (const n of g.keys()) if (!state.has(n)) visit(n);
  return found;
}

describe("engine import graph", () => {
  it("reads the imports (the check can see an edge)", () => {
    const g = graph();
    expect(g.get("app/engine/summary.ts")).toContain("app/engine/summary-finish.ts");
    expect(g.get("app/engine/summary-finish.ts")).toContain("app/engine/summary-state.ts");
  });

  it("finds a cycle when there is one (the check can fail)", () => {
    const g = new Map([["a.ts", ["b.ts"]], ["b.ts", ["c.ts"]], ["c.ts", ["a.ts"]], ["d.ts", ["a.ts"]]]);
    expect(cycles(g)).toEqual([["a.ts", "b.ts", "c.ts", "a.ts"]]);
  });

  it("has no cycle among app/engine and workers", () => {
    expect(cycles(graph())).toEqual([]);
  });
});
