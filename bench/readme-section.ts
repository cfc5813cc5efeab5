/** Replaces the marked benchmark section of README.md (creating the file or the section when missing). */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';

export const BENCH_START = '<!-- bench:start -->';
export const BENCH_END = '<!-- bench:end -->';

export function replaceSection(text: string, section: string): string {
  const block = `${BENCH_START}\n${section.trimEnd()}\n${BENCH_END}`;
  const a = text.indexOf(BENCH_START);
  const b = text.indexOf(BENCH_END);
  if (a >= 0 && b > a) return text.slice(0, a) + block + text.slice(b + BENCH_END.length);
  return `${text.trimEnd()}${text.trim() ? '\n\n' : ''}${block}\n`;
}

export function updateReadme(path: string, section: string): void {
  const text = existsSync(path) ? readFileSync(path, 'utf8') : '';
  writeFileSync(path, replaceSection(text, section));
}
