// Fields that recur in the JSON files tiercake writes: the stamp of the tool that wrote the
// file, and the SHA-256 digests (64 lowercase hex digits, scenario/scenarioHash.ts and the
// scan identity) that tie a marker, checkpoint, shard, scan partial or submission to its
// input. One schema each, so every reader checks them alike.

import * as z from 'zod';
import { toolVersion } from './toolVersion.js';

/** A SHA-256 digest as `digest('hex')` writes it. */
export const Sha256HexSchema = z.string().regex(/^[0-9a-f]{64}$/);

/** Which tool wrote the file, and its version. */
export const ToolStampSchema = z.strictObject({ name: z.literal('tiercake'), version: z.string() });

export type ToolStamp = z.output<typeof ToolStampSchema>;

/** The stamp of this tool (version from package.json unless given). */
export function toolStamp(version: string = toolVersion()): ToolStamp {
  return { name: 'tiercake', version };
}
