// The development mailbox lists and shows what the real catcher stored from a real SMTP send.
import { randomBytes } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { args, getRequest, outcome } from "./auth-support";
import { waitForMailTo } from "./helpers/mail";
import * as mailboxRoute from "~/routes/dev/mailbox";
import * as messageRoute from "~/routes/dev/message";
import { invitationMail, sendMail } from "~/server/mail.server";
import { requireDevMailbox } from "~/server/mailbox.server";
import { pool } from "~/server/db.server";

afterAll(async () => {
  await pool.end();
});

describe("development mailbox", () => {
  const to = `mailbox.${randomBytes(4).toString("hex")}@harrowgate.example`;

  it("lists a sent invitation and shows both of its parts", async () => {
    await sendMail(invitationMail(to, "Morven Ashdale", "Harrowgate Motor Club", "Analyst", "http://127.0.0.1:3100/invitations/abc"));
    const caught = await waitForMailTo(to);
    const list = await outcome(() => mailboxRoute.loader());
    const listed = (list.body as { messages: Array<{ id: string; to: string[]; subject: string }> }).messages;
    expect(listed.find((m) => m.id === caught.id)?.subject).toBe("Morven Ashdale invited you to Harrowgate Motor Club on Rakeline");
    const shown = await outcome(() => messageRoute.loader(args(getRequest(`/dev/mailbox/${caught.id}`), { id: caught.id })));
    const message = (shown.body as { message: { text: string; html: string } }).message;
    // RFC 2046 §5.1.4: multipart/alternative — the plain-text and HTML parts say the same thing.
    expect(message.text).toContain("http://127.0.0.1:3100/invitations/abc");
    expect(message.html).toContain("http://127.0.0.1:3100/invitations/abc");
  });

  it("does not exist in production", async () => {
    const refused = await outcome(() => requireDevMailbox("off"));
    expect(refused.status).toBe(404);
    expect((await outcome(() => requireDevMailbox("on"))).status).toBe(200);
  });

  it("answers 404 for an unknown or path-like message id", async () => {
    for (const id of ["no-such-message", "../../etc/passwd", "..%2Fsecret"]) {
      const shown = await outcome(() => messageRoute.loader(args(getRequest(`/dev/mailbox/x`), { id })));
      // RFC 9110 §15.5.5: 404 Not Found.
      expect(shown.status).toBe(404);
    }
  });
});
