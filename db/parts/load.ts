/**
 * Reads the part profiles shipped in this folder and validates each against the shared contract.
 *
 * A data file names its sources once (`sources`) and each value points at one by key, so a note
 * or a revision is corrected in one place. The keys are resolved here, before validation, so every
 * profile that leaves this module carries its full source objects and nothing downstream has to
 * know about the file layout.
 */
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { z } from 'zod';
import { partProfileSchema, sourceRefSchema, type PartProfile } from '../../shared/contracts/parts';

export const partsFolder = path.dirname(fileURLToPath(import.meta.url));

const partDataFileSchema = z.strictObject({
  sources: z.record(
    z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'source keys are lowercase words joined by hyphens'),
    sourceRefSchema,
  ),
  parts: z.array(z.unknown()).min(1),
});

/** Properties whose string value is a key into the file's `sources`. */
const SOURCE_PROPERTIES = new Set(['source', 'labelsSource']);

export class PartDataError extends Error {
  override name = 'PartDataError';
}

interface Resolution {
  sources: Record<string, unknown>;
  used: Set<string>;
  file: string;
}

function resolveSources(value: unknown, r: Resolution, at: string): unknown {
  if (Array.isArray(value)) return value.map((item, i) => resolveSources(item, r, `${at}[${i}]`));
  if (typeof value !== 'object' || value === null) return value;
  const resolved: Record<string, unknown> = {};
  for (const [key, child] of Object.entries(value)) {
    if (SOURCE_PROPERTIES.has(key) && typeof child === 'string') {
      if (!Object.hasOwn(r.sources, child)) {
        throw new PartDataError(
          `${r.file}: ${at}.${key} names source "${child}", which the file's "sources" does not define`,
        );
      }
      r.used.add(child);
      resolved[key] = r.sources[child];
    } else {
      resolved[key] = resolveSources(child, r, `${at}.${key}`);
    }
  }
  return resolved;
}

/** Parses one data file's JSON text into validated profiles; `file` is only used in messages. */
export function parsePartDataFile(text: string, file: string): PartProfile[] {
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    throw new PartDataError(`${file}: not valid JSON (${(error as Error).message})`, { cause: error });
  }
  const data = partDataFileSchema.safeParse(json);
  if (!data.success) throw new PartDataError(`${file}: ${z.prettifyError(data.error)}`);
  const resolution: Resolution = { sources: data.data.sources, used: new Set(), file };
  const profiles = data.data.parts.map((raw, index) => {
    const resolved = resolveSources(raw, resolution, `parts[${index}]`);
    const parsed = partProfileSchema.safeParse(resolved);
    if (!parsed.success) throw new PartDataError(`${file}: parts[${index}]: ${z.prettifyError(parsed.error)}`);
    return parsed.data;
  });
  // An unused source is usually a value that lost its citation in an edit.
  for (const key of Object.keys(data.data.sources)) {
    if (!resolution.used.has(key)) throw new PartDataError(`${file}: source "${key}" is defined but never used`);
  }
  return profiles;
}

/** Every profile in `folder` (default: this folder), validated; slugs are unique across files. */
export function loadPartProfiles(folder: string = partsFolder): PartProfile[] {
  const files = fs
    .readdirSync(folder)
    .filter((name) => name.endsWith('.json'))
    .sort();
  const profiles: PartProfile[] = [];
  const slugs = new Map<string, string>();
  for (const name of files) {
    for (const profile of parsePartDataFile(fs.readFileSync(path.join(folder, name), 'utf8'), name)) {
      const other = slugs.get(profile.slug);
      if (other) throw new PartDataError(`${name}: slug "${profile.slug}" is already used in ${other}`);
      slugs.set(profile.slug, name);
      profiles.push(profile);
    }
  }
  return profiles;
}
