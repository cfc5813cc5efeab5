/**
 * The stem of a report's download names (`<stem>.csv`, `<stem>.json`): the title in lower-case ASCII letters and
 * digits joined by single hyphens, at most 60 characters, never starting or ending with a hyphen.
 */
export function reportFileStem(title: string): string {
  const words = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '') // accents split off by NFKD
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter((w) => w.length > 0);
  let stem = '';
  for (const w of words) {
    const next = stem ? `${stem}-${w}` : w;
    if (next.length > 60) {
      if (!stem) stem = w.slice(0, 60);
      break;
    }
    stem = next;
  }
  return stem || 'report';
}
