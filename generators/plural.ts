/** "1 check", "3 checks", "1 difference": counts in messages read as English. Pure. */
export function plural(n: number, singular: string, pluralForm = `${singular}s`): string {
  return `${n} ${n === 1 ? singular : pluralForm}`;
}
