/**
 * The demo write-ups the seed turns into projects with revision history (shape: ../types.ts).
 * Everything in them is invented: no real people, projects or brands.
 */
import type { DemoProject } from '../types';
import { benchSupplyMonitor } from './bench-supply-monitor';
import { greenhouseVentController } from './greenhouse-vent-controller';
import { tideClock } from './tide-clock';

export const demoWriteUps: DemoProject[] = [greenhouseVentController, benchSupplyMonitor, tideClock];
