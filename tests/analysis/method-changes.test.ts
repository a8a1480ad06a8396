import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { METHOD_CHANGES, methodChangesMarkdown } from '../../src/analysis/method-changes.js';
import { TOOL_VERSION } from '../../src/version.js';

describe('method change notes', () => {
  it('the README section between the markers is the generated text', () => {
    const readme = readFileSync('README.md', 'utf8');
    const section = readme.split('<!-- method-changes:start -->\n')[1]?.split('<!-- method-changes:end -->')[0];
    expect(section).toBe(methodChangesMarkdown());
  });

  it('the newest note is for this version or an earlier one, and versions run newest first', () => {
    const key = (v: string) => v.split('.').map(Number).reduce((a, x) => a * 1000 + x, 0);
    expect(key(METHOD_CHANGES[0]!.version)).toBeLessThanOrEqual(key(TOOL_VERSION));
    for (let i = 1; i < METHOD_CHANGES.length; i++) expect(key(METHOD_CHANGES[i - 1]!.version)).toBeGreaterThan(key(METHOD_CHANGES[i]!.version));
  });
});
