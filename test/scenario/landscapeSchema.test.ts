// The landscape term schemas (src/scenario/landscapeSchema.ts) parsed directly, against the
// rules the scenario reference states for every term: `kind` picks the term, `name` is
// optional, letters, digits, ".", "_" and "-" only, at most 40 characters, and a term takes
// no key it does not know (strict objects).
import { describe, expect, it } from 'vitest';
import { LandscapeTermSchema } from '../../src/scenario/landscapeSchema.js';

// the smallest valid term of each kind, written from the keys reference
const minimal: Record<string, Record<string, unknown>> = {
  sites: { kind: 'sites', file: 'eps.npy' },
  image: { kind: 'image', file: 'dmd.png', pixelSize: 0.5 },
  gradient: { kind: 'gradient', direction: [1, 0] },
  box: { kind: 'box', shape: 'disc', wallHeight: 2 },
  superlattice: { kind: 'superlattice' },
};

describe('landscape term schemas', () => {
  for (const [kind, term] of Object.entries(minimal)) {
    it(`${kind}: kind kept, name optional and checked, unknown keys refused`, () => {
      expect(LandscapeTermSchema.parse(term).kind).toBe(kind);
      expect(LandscapeTermSchema.parse({ ...term, name: 'wall_2.left-1' }).name).toBe('wall_2.left-1');
      for (const bad of ['two words', '-leading', 'x'.repeat(41), '']) {
        expect(LandscapeTermSchema.safeParse({ ...term, name: bad }).success, `${kind} name "${bad}"`).toBe(false);
      }
      expect(LandscapeTermSchema.safeParse({ ...term, name: 'a'.repeat(40) }).success).toBe(true);
      expect(LandscapeTermSchema.safeParse({ ...term, colour: 'red' }).success).toBe(false);
    });
  }
});
