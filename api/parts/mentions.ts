/**
 * Which errata and lessons mention a part. Pure: the candidates come from queries.ts, already
 * limited to what the viewer may read.
 *
 * - An erratum mentions a part when its `parts` list holds the part's name or one of its aliases
 *   (compared as search compares them: NFKC, case-insensitive, spacing collapsed). Its `pins`
 *   that the part's profile resolves (`resolvePin`: "A6", "ADC6", "pin 19" …) are listed with the
 *   mention. Pin labels alone do not make a mention: "GPIO18" or "D7" exist on many parts.
 * - A lesson mentions a part when it is linked to an erratum that does (it carries that
 *   erratum's pins), or when its text names the part or an alias as a whole word. Only names
 *   with a letter and a digit count in text ("RP2040", "ATmega328P"), so words like "Pico" or
 *   "TTL" in prose do not turn every lesson into a mention.
 */
import type { PartMention } from '../../shared/contracts/checks';
import type { PartProfile } from '../../shared/contracts/parts';
import { resolvePin } from '../../shared/checks/pins';
import { normalizeForSearch } from '../../shared/search/normalize';

export interface ErratumCandidate {
  id: number;
  number: number;
  title: string;
  parts: string[];
  pins: string[];
  severity: string;
  updatedAt: Date;
  projectSlug: string;
  projectTitle: string;
}

export interface LessonCandidate {
  id: number;
  /** Plain text of the lesson (Markdown removed). */
  text: string;
  erratumIds: number[];
  updatedAt: Date;
  projectSlug: string;
  projectTitle: string;
}

export function normalisePartName(name: string): string {
  return normalizeForSearch(name).toLowerCase().replace(/\s+/g, ' ').trim();
}

function namesOf(profile: Pick<PartProfile, 'name' | 'aliases'>): string[] {
  return [...new Set([profile.name, ...profile.aliases].map(normalisePartName).filter(Boolean))];
}

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

const lessonTitle = (text: string) => {
  const line = text.trim().replace(/\s+/g, ' ');
  return line.length > 120 ? `${line.slice(0, 119)}…` : line;
};

/** The mentions of one part, newest change first. */
export function mentionsOf(
  profile: PartProfile,
  errata: readonly ErratumCandidate[],
  lessons: readonly LessonCandidate[],
): PartMention[] {
  const names = new Set(namesOf(profile));
  const pinsByErratum = new Map<number, string[]>();
  const mentions: (PartMention & { at: number })[] = [];
  for (const e of errata) {
    if (!e.parts.some((p) => names.has(normalisePartName(p)))) continue;
    const pins = e.pins.filter((label) => resolvePin(profile, label) !== undefined);
    pinsByErratum.set(e.id, pins);
    mentions.push({
      kind: 'erratum',
      title: `E${e.number} ${e.title}`,
      url: `/projects/${e.projectSlug}/errata/E${e.number}`,
      projectSlug: e.projectSlug,
      projectTitle: e.projectTitle,
      pins,
      severity: e.severity,
      updatedAt: e.updatedAt.toISOString(),
      at: e.updatedAt.getTime(),
    });
  }
  const textNames = [...names].filter((n) => n.length >= 3 && /\d/.test(n) && /[a-z]/.test(n));
  const textPattern = textNames.length
    ? new RegExp(`(?<![\\p{L}\\p{N}])(?:${textNames.map(escapeRegExp).join('|')})(?![\\p{L}\\p{N}])`, 'iu')
    : null;
  for (const l of lessons) {
    const linked = l.erratumIds.filter((id) => pinsByErratum.has(id));
    const named = textPattern !== null && textPattern.test(normalisePartName(l.text));
    if (!linked.length && !named) continue;
    mentions.push({
      kind: 'lesson',
      title: lessonTitle(l.text),
      url: `/projects/${l.projectSlug}#lessons`,
      projectSlug: l.projectSlug,
      projectTitle: l.projectTitle,
      pins: [...new Set(linked.flatMap((id) => pinsByErratum.get(id) ?? []))],
      severity: null,
      updatedAt: l.updatedAt.toISOString(),
      at: l.updatedAt.getTime(),
    });
  }
  return mentions.sort((a, b) => b.at - a.at).map(({ at: _at, ...mention }) => mention);
}
