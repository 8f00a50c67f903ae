// Small wording helpers shared by pages and e-mails.

/** "1 trial", "3 trials", "0 misses": a count with its noun in the right number. */
export function countOf(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`
}
