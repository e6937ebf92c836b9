// The shared fields of tiercake's own JSON records (src/output/recordFields.ts): the SHA-256
// digest schema against a published test vector, and the tool stamp against package.json
// read here.

import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from '../../src/output/recordFields.js';

// FIPS 180-2, appendix B.1: SHA-256("abc")
const abcDigest = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';

describe('Sha256HexSchema', () => {
  it('accepts a digest as node:crypto writes it', () => {
    expect(createHash('sha256').update('abc').digest('hex')).toBe(abcDigest);
    expect(Sha256HexSchema.parse(abcDigest)).toBe(abcDigest);
  });

  it('refuses upper case, a digit too few or too many, and text around it', () => {
    for (const bad of [abcDigest.toUpperCase(), abcDigest.slice(1), `${abcDigest}0`, ` ${abcDigest}`, `${abcDigest.slice(0, 63)}g`]) {
      expect(Sha256HexSchema.safeParse(bad).success).toBe(false);
    }
  });
});

describe('tool stamp', () => {
  const version = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }).version;

  it('names tiercake with the version of package.json, or the one given', () => {
    expect(toolStamp()).toEqual({ name: 'tiercake', version });
    expect(toolStamp('9.9.9')).toEqual({ name: 'tiercake', version: '9.9.9' });
    expect(ToolStampSchema.parse(toolStamp())).toEqual({ name: 'tiercake', version });
  });

  it('refuses another tool name and extra keys', () => {
    expect(ToolStampSchema.safeParse({ name: 'other', version }).success).toBe(false);
    expect(ToolStampSchema.safeParse({ name: 'tiercake', version, extra: 1 }).success).toBe(false);
    expect(ToolStampSchema.safeParse({ name: 'tiercake' }).success).toBe(false);
  });
});
