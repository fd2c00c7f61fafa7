/**
 * The demo errata, lessons, proposals, discussions and followers of the three demo projects
 * (shape: ../types.ts), in the same order as the write-ups they belong to. Everything in them is
 * invented: no real people, projects or brands.
 */
import type { DemoContributions } from '../types';
import { benchSupplyContributions } from './bench-supply-monitor';
import { greenhouseContributions } from './greenhouse-vent-controller';
import { tideClockContributions } from './tide-clock';

export const demoContributions: DemoContributions[] = [
  greenhouseContributions,
  benchSupplyContributions,
  tideClockContributions,
];
