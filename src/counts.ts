// Counts as messages write them: "1 row", "2,041 stress problems".

/** "1 row", "2 rows", "0 rows"; `many` for irregular plurals ("1 entry", "2 entries"). */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${grouped(n)} ${n === 1 ? one : many}`;
}

/**
 * A count with commas between groups of three digits, as `toLocaleString("en-US")` writes it;
 * whole numbers without it (its first call loads the locale data: tens of milliseconds).
 */
export function grouped(n: number): string {
  if (!Number.isSafeInteger(n)) return n.toLocaleString("en-US");
  const digits = String(Math.abs(n)).replace(/\B(?=(\d{3})+$)/g, ",");
  return n < 0 ? `-${digits}` : digits;
}
