// The ownership marker of an output folder: a small JSON file, `.tiercake-output.json`,
// written last into every folder tiercake creates. It names the tool, its version, the
// command, the hash of the scenario (src/scenario/scenarioHash.ts) and every file the
// command wrote. The folder writer (outputFolder.ts) replaces an existing folder only when
// its marker is valid and the folder holds nothing but the files listed in it, so a file a
// person added (notes, a thesis, another program's results) is never deleted.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from './recordFields.js';

export const OUTPUT_MARKER = '.tiercake-output.json';
export const OUTPUT_MARKER_FORMAT = 'tiercake-output-folder';
export const OUTPUT_MARKER_VERSION = 1;

/** A relative path inside the folder: no absolute paths, no '..', no empty segments. */
const RelativeFile = z
  .string()
  .min(1)
  .max(1000)
  .refine((p) => !p.startsWith('/') && p.split('/').every((s) => s.length > 0 && s !== '.' && s !== '..'), 'expected a relative path inside the folder');

export const OutputMarkerSchema = z.strictObject({
  format: z.literal(OUTPUT_MARKER_FORMAT),
  formatVersion: z.literal(OUTPUT_MARKER_VERSION),
  tool: ToolStampSchema,
  command: z.string().min(1).max(100),
  scenarioHash: Sha256HexSchema.nullable(),
  createdIso: z.string(),
  files: z.array(RelativeFile).max(1_000_000),
  note: z.string(),
  /** cautions already shown for this folder (e.g. 'laser-safety'); shown again only for a new folder */
  cautions: z.array(z.string().min(1).max(100)).max(100).optional(),
});

export type OutputMarker = z.infer<typeof OutputMarkerSchema>;

/** What a command says about the folder it writes. */
export interface OutputIdentity {
  /** the command that writes the folder, e.g. 'solve' or 'ensemble shard' */
  command: string;
  /** scenarioHash() of the scenario as run, or null (diagram, hubbard) */
  scenarioHash: string | null;
  /** cautions shown for this folder, recorded in the marker (cautionsShownFor reads them back) */
  cautions?: readonly string[];
}

export function markerText(identity: OutputIdentity, files: readonly string[], createdIso: string): string {
  const marker: OutputMarker = {
    format: OUTPUT_MARKER_FORMAT,
    formatVersion: OUTPUT_MARKER_VERSION,
    tool: toolStamp(),
    command: identity.command,
    scenarioHash: identity.scenarioHash,
    createdIso,
    files: [...files].sort(),
    note: 'written by tiercake; it replaces this folder only while the folder holds no file other than those listed here',
    ...(identity.cautions !== undefined && identity.cautions.length > 0 ? { cautions: [...identity.cautions] } : {}),
  };
  return `${JSON.stringify(marker, null, 2)}\n`;
}

/**
 * The marker of `folder`: `null` when the folder has none, `{ error }` when the file is
 * there but is not a valid marker (then the folder is treated as not ours).
 */
export function readMarker(folder: string): OutputMarker | null | { error: string } {
  let text: string;
  try {
    text = readFileSync(join(folder, OUTPUT_MARKER), 'utf8');
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return null;
    return { error: `its ${OUTPUT_MARKER} cannot be read (${(err as NodeJS.ErrnoException).code ?? 'unknown error'})` };
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch {
    return { error: `its ${OUTPUT_MARKER} is not valid JSON` };
  }
  const result = OutputMarkerSchema.safeParse(parsed);
  if (!result.success) return { error: `its ${OUTPUT_MARKER} is not a tiercake marker` };
  return result.data;
}

/** The cautions the marker of `folder` records as shown ([] for a folder without a valid marker). */
export function cautionsShownFor(folder: string): string[] {
  const marker = readMarker(folder);
  if (marker === null || 'error' in marker) return [];
  return marker.cautions ?? [];
}
