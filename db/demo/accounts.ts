/**
 * The demo people: an invented scenario, no real persons. The same accounts exist in the
 * local fake GitHub provider (same numeric ids), so signing in as one lands on the seeded user.
 */
import type { SiteRole } from '../../shared/domain';

export interface DemoAccount {
  /** The provider's numeric account id. */
  githubId: number;
  login: string;
  name: string;
  email: string;
  role: SiteRole;
  /** What the README says this account is for. */
  purpose: string;
}

export const demoAccounts: DemoAccount[] = [
  {
    githubId: 81_000_001,
    login: 'ilse-marrow',
    name: 'Ilse Marrow',
    email: 'ilse@makers.invalid',
    role: 'member',
    purpose: 'maker: owns the greenhouse vent controller and the bench supply monitor',
  },
  {
    githubId: 81_000_002,
    login: 'juniper-okoye',
    name: 'Juniper Okoye',
    email: 'juniper@makers.invalid',
    role: 'member',
    purpose: 'maker: editor on the greenhouse vent controller, owns the tide clock',
  },
  {
    githubId: 81_000_003,
    login: 'bram-tolliver',
    name: 'Bram Tolliver',
    email: 'bram@makers.invalid',
    role: 'member',
    purpose: 'contributor: built a Rev A board and reports what he found',
  },
  {
    githubId: 81_000_004,
    login: 'odile-fenwick',
    name: 'Odile Fenwick',
    email: 'odile@makers.invalid',
    role: 'moderator',
    purpose: 'moderator: curates tags and handles flags',
  },
  {
    githubId: 81_000_005,
    login: 'quill-haverford',
    name: 'Quill Haverford',
    email: 'quill@makers.invalid',
    role: 'admin',
    purpose: 'admin: grants roles and suspends accounts',
  },
];
