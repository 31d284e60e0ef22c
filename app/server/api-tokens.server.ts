/**
 * Per-user API tokens for the headless API, each scoped to one team. The token is shown once, when it
 * is made; only its SHA-256 is stored (a token is 32 random bytes, so a plain hash is enough: there is
 * nothing to guess). A token acts with its owner's current role in its team and stops working when
 * the owner leaves the team or revokes it.
 */
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { and, desc, eq, isNull, lt, or } from "drizzle-orm";
import { z } from "zod";
import { apiTokens } from "../db/schema/api-tokens";
import { member, organization } from "../db/schema/auth";
import { recordAudit } from "./audit.server";
import { db } from "./db.server";

/** Tokens start with this, so a leaked one is recognisable in logs and secret scanners. */
export const TOKEN_PREFIX = "rkl_";
const TOKEN_SHAPE = /^rkl_[A-Za-z0-9_-]{43}$/;
/** Last-used times are written at most this often per token (a busy script would otherwise write on every call). */
const LAST_USED_STEP_MS = 60_000;

export const createTokenSchema = z.object({
  name: z
    .string({ error: "Give the token a name, e.g. the laptop or script that will use it." })
    .transform((s) => s.normalize("NFC").trim())
    .refine((s) => s.length >= 1, "Give the token a name, e.g. the laptop or script that will use it.")
    .refine((s) => s.length <= 80, "Keep the token's name to 80 characters."),
  team: z.string({ error: "Name the team (its slug) the token is for." }).trim().min(1, "Name the team (its slug) the token is for.").max(80, "No such team."),
});

export function hashToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

export type TokenListing = {
  id: string;
  name: string;
  team: { slug: string; name: string };
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
};

export type CreatedToken = { ok: true; id: string; token: string } | { ok: false; status: 404; message: string };

/** Makes a token for a team the user belongs to; the token itself is returned only here. */
export async function createApiToken(userId: string, teamSlug: string, name: string): Promise<CreatedToken> {
  const [team] = await db
    .select({ id: organization.id, slug: organization.slug })
    .from(member)
    .innerJoin(organization, eq(member.organizationId, organization.id))
    .where(and(eq(member.userId, userId), eq(organization.slug, teamSlug)))
    .limit(1);
  if (!team) return { ok: false, status: 404, message: "No such team, or you are not a member of it." };
  const token = TOKEN_PREFIX + randomBytes(32).toString("base64url");
  const id = randomUUID();
  await db.transaction(async (tx) => {
    await tx.insert(apiTokens).values({ id, userId, teamId: team.id, name, tokenHash: hashToken(token), tokenPrefix: token.slice(0, 12), createdAt: new Date() });
    await recordAudit(tx, { teamId: team.id, actorUserId: userId, action: "api_token_created", subjectType: "api_token", subjectId: id, detail: { name } });
  });
  return { ok: true, id, token };
}

/** The user's tokens that still work, newest first, without secrets. */
export async function listApiTokens(userId: string): Promise<TokenListing[]> {
  const rows = await db
    .select({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.tokenPrefix, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt, slug: organization.slug, teamName: organization.name })
    .from(apiTokens)
    .innerJoin(organization, eq(apiTokens.teamId, organization.id))
    .where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)))
    .orderBy(desc(apiTokens.createdAt), desc(apiTokens.id));
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    team: { slug: r.slug, name: r.teamName },
    prefix: r.prefix,
    createdAt: r.createdAt.toISOString(),
    lastUsedAt: r.lastUsedAt ? r.lastUsedAt.toISOString() : null,
  }));
}

/** Revokes one of the user's own tokens; false when there is no such working token of theirs. */
export async function revokeApiToken(userId: string, tokenId: string): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .select({ id: apiTokens.id, teamId: apiTokens.teamId, name: apiTokens.name })
      .from(apiTokens)
      .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)))
      .limit(1)
      .for("update");
    if (!row) return false;
    await tx.update(apiTokens).set({ revokedAt: new Date() }).where(eq(apiTokens.id, row.id));
    await recordAudit(tx, { teamId: row.teamId, actorUserId: userId, action: "api_token_revoked", subjectType: "api_token", subjectId: row.id, detail: { name: row.name } });
    return true;
  });
}

export type TokenHolder = { tokenId: string; userId: string; teamId: string; teamSlug: string; role: string };

/** Who a presented token acts for, or null (unknown, revoked, or its owner is no longer in the team). */
export async function authenticateToken(token: string): Promise<TokenHolder | null> {
  if (!TOKEN_SHAPE.test(token)) return null;
  const [row] = await db
    .select({ tokenId: apiTokens.id, userId: apiTokens.userId, teamId: apiTokens.teamId, teamSlug: organization.slug, role: member.role, lastUsedAt: apiTokens.lastUsedAt })
    .from(apiTokens)
    .innerJoin(organization, eq(apiTokens.teamId, organization.id))
    .innerJoin(member, and(eq(member.organizationId, apiTokens.teamId), eq(member.userId, apiTokens.userId)))
    .where(and(eq(apiTokens.tokenHash, hashToken(token)), isNull(apiTokens.revokedAt)))
    .limit(1);
  if (!row) return null;
  const now = new Date();
  if (!row.lastUsedAt || now.getTime() - row.lastUsedAt.getTime() > LAST_USED_STEP_MS) {
    const stale = new Date(now.getTime() - LAST_USED_STEP_MS);
    await db
      .update(apiTokens)
      .set({ lastUsedAt: now })
      .where(and(eq(apiTokens.id, row.tokenId), or(isNull(apiTokens.lastUsedAt), lt(apiTokens.lastUsedAt, stale))));
  }
  return { tokenId: row.tokenId, userId: row.userId, teamId: row.teamId, teamSlug: row.teamSlug, role: row.role };
}
