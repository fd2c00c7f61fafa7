/**
 * Data as the server sends it (shared/contracts), for client tests: each factory fills in an
 * invented, plausible value for every field and takes what a test cares about.
 */
import type { ProjectDetail } from '@shared/contracts/projects';
import type { Upload } from '@shared/contracts/uploads';

/** An upload as the server describes one (shared/contracts/uploads.ts), with what a test sets. */
export function anUpload(overrides: Partial<Upload> = {}): Upload {
  const id = overrides.id ?? 12;
  return {
    id,
    kind: 'image',
    state: 'ready',
    mime: 'image/jpeg',
    bytes: 240_000,
    name: 'bodge.jpg',
    width: 1600,
    height: 1200,
    altText: '',
    caption: '',
    variants: [
      { name: 'thumb', format: 'webp', width: 400, height: 300, bytes: 18_000, url: `/api/uploads/${id}/thumb.webp` },
      { name: 'page', format: 'webp', width: 1400, height: 1050, bytes: 120_000, url: `/api/uploads/${id}/page.webp` },
    ],
    url: `/api/uploads/${id}/original.jpg`,
    markdownUrl: `/api/uploads/${id}/page.webp`,
    srcset: `/api/uploads/${id}/thumb.webp 400w, /api/uploads/${id}/page.webp 1400w`,
    sizes: '(max-width: 800px) 100vw, 800px',
    entries: null,
    entriesTruncated: false,
    failure: null,
    referenced: false,
    createdAt: '2026-03-14T10:00:00.000Z',
    ...overrides,
  };
}

export function aProject(overrides: Partial<ProjectDetail> = {}): ProjectDetail {
  const owner = { id: 1, handle: 'ilse-marrow', displayName: 'Ilse Marrow', avatarUrl: null };
  return {
    id: 3,
    slug: 'kiln-logger',
    title: 'Kiln Temperature Logger',
    summary: 'Thermocouple logger for a small ceramics kiln.',
    licence: 'CERN-OHL-S-2.0',
    licenceOther: '',
    repoUrl: '',
    hazards: [],
    status: 'draft',
    revision: 1,
    owner,
    members: [{ ...owner, role: 'owner' }],
    boardRevisions: [],
    sections: [],
    logEntries: [],
    createdAt: '2026-03-01T09:00:00.000Z',
    updatedAt: '2026-03-14T10:00:00.000Z',
    publishedAt: null,
    cover: null,
    viewer: { canEdit: true, canOwn: true, canRestore: true },
    ...overrides,
  } as ProjectDetail;
}
