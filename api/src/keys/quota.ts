/** A partner key's daily quota as the key-day limiter holds it. */
export interface QuotaLeft {
  limit: number;
  /** requests left in the open window; the whole limit when none is open */
  remaining: number;
  /** when the open window ends; null when none is open */
  resetsAt: Date | null;
}
