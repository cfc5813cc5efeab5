/**
 * The evaluate command's help and error messages name only options that `evaluate` accepts (an earlier message
 * told people to use --allowed-chars, which only `train` knows).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseEvaluateArgs } from './evaluate-options';

/** Files whose messages reach a person running `npm run evaluate`. */
const FILES = ['evaluate-options.ts', 'evaluate-run.ts', 'evaluate.ts', 'corpus-file.ts', 'word-file.ts'];

function accepted(flag: string): boolean {
  try {
    parseEvaluateArgs(['model.nwck', '--corpus', 'c.txt', `--${flag}`, 'x']);
    return true;
  } catch (e) {
    const err = e as Error & { code?: string };
    // Node's parseArgs: an unknown option; anything else (a bad value, a boolean given a value) means it is known.
    return err.code !== 'ERR_PARSE_ARGS_UNKNOWN_OPTION';
  }
}

describe('evaluate messages', () => {
  it('mention only options evaluate accepts', () => {
    const flags = new Set<string>();
    for (const file of FILES) {
      const text = readFileSync(new URL(`./${file}`, import.meta.url), 'utf8');
      // Only string literals and template text: comments may name the train command's options.
      const code = text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
      for (const m of code.matchAll(/--([a-z][a-z-]+)/g)) flags.add(m[1]!);
    }
    expect(flags.size).toBeGreaterThan(10);
    const unknown = [...flags].filter((f) => !accepted(f));
    expect(unknown).toEqual([]);
    // The check itself can tell a known option from an unknown one.
    expect(accepted('allowed-chars')).toBe(false);
    expect(accepted('held-out-file')).toBe(true);
  });
});
