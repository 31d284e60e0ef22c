// Every action the code records in the audit log has words on the audit page (AUDIT_ACTIONS): the owner
// reads "created an API token", not "api_token_created". recordAudit's `action` is typed as one of those
// keys, and this test scans the source too (a call through `as never` or a computed action would slip past
// the type), so a new event without words fails here. The words themselves are our product's own.
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { AUDIT_ACTIONS } from "~/server/audit.server";

const ROOTS = ["app", "scripts"];

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    if (name === "node_modules" || name.startsWith(".") || name === "+types") continue;
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) out.push(...sourceFiles(full));
    else if (/\.(ts|tsx|mts)$/.test(name) && !name.endsWith(".d.ts")) out.push(full);
  }
  return out;
}

/** The text of each `recordAudit(` call's arguments (balanced parentheses), with where it starts. */
export function recordAuditCalls(text: string): Array<{ line: number; args: string }> {
  const calls: Array<{ line: number; args: string }> = [];
  const re = /\brecordAudit\s*\(/g;
  for (let m = re.exec(text); m; m = re.exec(text)) {
    // The function's own declaration is not a call.
    if (/function\s+$/.test(text.slice(Math.max(0, m.index - 20), m.index))) continue;
    let depth = 1;
    let i = m.index + m[0].length;
    for (; i < text.length && depth > 0; i++) {
      if (text[i] === "(") depth++;
      else if (text[i] === ")") depth--;
    }
    calls.push({ line: text.slice(0, m.index).split("\n").length, args: text.slice(m.index + m[0].length, i - 1) });
  }
  return calls;
}

function recordedActions() {
  const found: Array<{ where: string; action: string | null }> = [];
  for (const root of ROOTS) {
    for (const file of sourceFiles(root)) {
      if (file === path.join("app", "server", "audit.server.ts")) continue;
      for (const call of recordAuditCalls(readFileSync(file, "utf8"))) {
        const literal = /\baction\s*:\s*"([^"]*)"/.exec(call.args);
        found.push({ where: `${file}:${call.line}`, action: literal ? literal[1] : null });
      }
    }
  }
  return found;
}

describe("audit words", () => {
  it("the scanner reads a call's action, and names a call whose action is not a plain literal", () => {
    const sample = [
      "await recordAudit(tx, { teamId, actorUserId: f(a, (b)), action: \"car_created\", subjectType: \"car\", subjectId: id });",
      "await recordAudit(tx, {\n  teamId,\n  action: kind,\n});",
    ].join("\n");
    const calls = recordAuditCalls(sample);
    expect(calls).toHaveLength(2);
    expect(/action\s*:\s*"([^"]*)"/.exec(calls[0].args)?.[1]).toBe("car_created");
    expect(calls[1].line).toBe(2);
    expect(/action\s*:\s*"([^"]*)"/.exec(calls[1].args)).toBeNull();
  });

  it("every recordAudit call in app/ and scripts/ names its action literally, and each action has words", () => {
    const found = recordedActions();
    // The code records uploads, deletions, setup versions, roles and Brief links at least (issue 12, item 2).
    expect(found.length).toBeGreaterThanOrEqual(30);
    const notLiteral = found.filter((f) => f.action === null).map((f) => f.where);
    expect(notLiteral, "recordAudit calls whose action is not a string literal").toEqual([]);
    const withoutWords = found.filter((f) => f.action !== null && !(f.action in AUDIT_ACTIONS)).map((f) => `${f.where} ${f.action}`);
    expect(withoutWords, "recorded actions with no words in AUDIT_ACTIONS").toEqual([]);
    const actions = new Set(found.map((f) => f.action));
    for (const action of ["session_uploaded", "session_deleted", "setup_version_created", "member_role_changed", "brief_created", "brief_viewed", "api_token_created", "venue_created"]) {
      expect(actions.has(action), action).toBe(true);
    }
  });

  it("the words are readable: not the code itself, no underscores", () => {
    for (const [action, words] of Object.entries(AUDIT_ACTIONS)) {
      expect(words, action).not.toBe(action);
      expect(words, action).not.toMatch(/_/);
      expect(words.length, action).toBeGreaterThan(5);
    }
  });
});
