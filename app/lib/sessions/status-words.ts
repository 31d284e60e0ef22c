/**
 * A session's status detail while a re-analysis waits: written by the re-analysis request and left unsaid
 * on the Balance report while the job's own box there says the same (client-safe, so both sides share it).
 */
export const REANALYSIS_QUEUED_DETAIL = "Re-analysis queued: the server will read the stored file again.";
