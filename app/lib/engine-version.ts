/**
 * The engine version a session's figures were made with, stored beside every summary (browser upload, API
 * upload, seed, server re-check). One function, so the browser's first reading and the server's re-check name
 * the same engine the same way.
 */
export const engineVersionOf = (summary: { summary_version: number }): string => `summary-v${summary.summary_version}`;
