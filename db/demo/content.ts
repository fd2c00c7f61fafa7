/**
 * Demo projects, board revisions and write-ups. Everything here is invented for the demo.
 */
import type { Tx } from '../client';
import { boardRevisions, projectMembers, projects } from '../schema';

export async function seedDemoContent(tx: Tx, userIds: Map<string, number>): Promise<void> {
  const id = (login: string) => {
    const value = userIds.get(login);
    if (value === undefined) throw new Error(`demo account ${login} missing`);
    return value;
  };
  const demoProjects = [
    {
      slug: 'greenhouse-vent-controller',
      owner: 'ilse-marrow',
      editors: ['juniper-okoye'],
      title: 'Greenhouse vent controller',
      summary: 'Opens and closes a lean-to greenhouse roof vent from temperature and humidity, on a Nano-footprint ATmega328P board.',
      licence: 'CERN-OHL-S-2.0',
      hazards: ['mains'],
      boards: [
        { label: 'Rev A', releasedOn: '2026-03-14', notes: 'First run of five boards.' },
        { label: 'Rev B', releasedOn: '2026-06-02', notes: 'Relay driver moved off A6; larger regulator.' },
      ],
    },
    {
      slug: 'bench-supply-monitor',
      owner: 'ilse-marrow',
      editors: [],
      title: 'Bench supply monitor',
      summary: 'An RP2040 add-on that logs voltage and current of a linear bench supply and trips a relay on over-current.',
      licence: 'MIT',
      hazards: ['high_current'],
      boards: [{ label: 'Rev A', releasedOn: '2026-08-20', notes: 'Hand-assembled prototype.' }],
    },
  ];
  for (const p of demoProjects) {
    const [created] = await tx
      .insert(projects)
      .values({
        slug: p.slug,
        ownerId: id(p.owner),
        title: p.title,
        summary: p.summary,
        licence: p.licence,
        hazards: p.hazards,
        status: 'published',
        publishedAt: new Date(),
      })
      .returning({ id: projects.id });
    const projectId = created!.id;
    await tx.insert(projectMembers).values({ projectId, userId: id(p.owner), role: 'owner' });
    for (const editor of p.editors) await tx.insert(projectMembers).values({ projectId, userId: id(editor), role: 'editor' });
    await tx.insert(boardRevisions).values(p.boards.map((b, position) => ({ ...b, projectId, position })));
  }
}
