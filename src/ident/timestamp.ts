/**
 * ISO-8601 date-time parsing for logged time columns, without `Date.parse` (whose accepted
 * formats are implementation-defined) and without the local time zone (the core must give the
 * same answer on every machine).
 */

// YYYY-MM-DD, then T or a space, hh:mm[:ss[.fff]], optional Z or ±hh[:]mm.
const ISO = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|z|[+-]\d{2}(?::?\d{2})?)?$/;

/** A parsed timestamp. */
export interface ParsedTimestamp {
  /** Milliseconds since 1970-01-01T00:00:00Z (the wall clock taken as UTC when there is no zone). */
  epochMs: number;
  /** True when the text carried a zone (Z or an offset). */
  hasZone: boolean;
}

/**
 * Parse an ISO-8601 date-time such as `2024-03-05T14:02:07.250Z` or `2024-03-05 14:02:07`.
 * Returns null when the text is not one (or names an impossible date or time).
 */
export function parseIsoTimestamp(text: string): ParsedTimestamp | null {
  const m = ISO.exec(text.trim());
  if (m === null) return null;
  const year = +m[1];
  const month = +m[2];
  const day = +m[3];
  const hour = +m[4];
  const minute = +m[5];
  const second = m[6] === undefined ? 0 : +m[6];
  if (month < 1 || month > 12 || day < 1 || day > 31 || hour > 24 || minute > 59 || second > 60) return null;
  const frac = m[7] === undefined ? 0 : +`0.${m[7]}`;
  let epochMs = Date.UTC(year, month - 1, day, hour, minute, second) + frac * 1000;
  // Date.UTC rolls 31 February over to March: reject rather than guess.
  const check = new Date(Date.UTC(year, month - 1, day));
  if (check.getUTCDate() !== day) return null;
  const zone = m[8];
  if (zone !== undefined && zone !== 'Z' && zone !== 'z') {
    const sign = zone[0] === '-' ? -1 : 1;
    const digits = zone.slice(1).replace(':', '');
    const oh = +digits.slice(0, 2);
    const om = digits.length > 2 ? +digits.slice(2, 4) : 0;
    epochMs -= sign * (oh * 60 + om) * 60000;
  }
  return { epochMs, hasZone: zone !== undefined };
}
