// @vitest-environment happy-dom
import { mount, type VueWrapper } from '@vue/test-utils';
import { afterEach, describe, expect, it } from 'vitest';
import { createVuetify } from 'vuetify';
import RevisionFieldDiff from '@/components/history/RevisionFieldDiff.vue';

// Two versions of an invented project's metadata, with licence and hazards already mapped to
// their display names (as the project history page does).
const labels = {
  title: 'Title',
  summary: 'Summary',
  licence: 'Licence',
  licenceOther: 'Licence description',
  repoUrl: 'Source repository',
  hazards: 'Hazard marks',
};
const older = {
  title: 'Kelpie bench supply',
  summary: 'A 5 V bench supply with current limit',
  licence: 'MIT License',
  licenceOther: '',
  repoUrl: '',
  hazards: ['Mains voltage', 'Heat'],
};
const newer = {
  title: 'Kelpie bench supply',
  summary: 'A 12 V bench supply with current limit',
  licence: 'MIT License',
  licenceOther: '',
  repoUrl: 'https://example.org/kelpie',
  hazards: ['Heat', 'High current'],
};

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

function mountFields(props: Partial<InstanceType<typeof RevisionFieldDiff>['$props']> = {}) {
  wrapper = mount(RevisionFieldDiff, {
    props: { oldFields: older, newFields: newer, labels, ...props },
    global: { plugins: [createVuetify()] },
  });
  return wrapper;
}

describe('RevisionFieldDiff', () => {
  it('lists only the fields that differ, labelled, in the order of the labels', () => {
    const w = mountFields();
    expect(w.findAll('dt').map((dt) => dt.text())).toEqual(['Summary', 'Source repository', 'Hazard marks']);
  });

  it('shows a changed text field with its changed words marked', () => {
    const summary = mountFields().find('[data-field="summary"] dd');
    expect(summary.attributes('data-kind')).toBe('text');
    expect(summary.findAll('del').map((d) => d.text())).toEqual(['5']);
    expect(summary.findAll('ins').map((i) => i.text())).toEqual(['12']);
    expect(summary.element.textContent).toBe('A 512 V bench supply with current limit');
  });

  it('shows a text field that was empty as wholly inserted', () => {
    const repo = mountFields().find('[data-field="repoUrl"] dd');
    expect(repo.findAll('ins').map((i) => i.text())).toEqual(['https://example.org/kelpie']);
    expect(repo.findAll('del')).toHaveLength(0);
  });

  it('shows a set as chips for what was added and removed, and names what stayed', () => {
    const hazards = mountFields().find('[data-field="hazards"] dd');
    expect(hazards.attributes('data-kind')).toBe('set');
    const added = hazards.findAll('[data-change="added"]');
    const removed = hazards.findAll('[data-change="removed"]');
    expect(added.map((chip) => chip.text())).toEqual(['+\u00a0added: High current']);
    expect(removed.map((chip) => chip.text())).toEqual(['\u2212\u00a0removed: Mains voltage']);
    expect(removed[0]!.find('s').text()).toBe('Mains voltage');
    expect(hazards.text()).toContain('Unchanged: Heat');
  });

  it('treats a reordered set as unchanged', () => {
    const w = mountFields({ newFields: { ...older, hazards: ['Heat', 'Mains voltage'] } });
    expect(w.find('[data-field="hazards"]').exists()).toBe(false);
    expect(w.find('[data-testid="no-field-changes"]').text()).toBe('No field differs between these revisions.');
  });

  it('shows other values as before → after, with empty values named', () => {
    const w = mountFields({
      oldFields: { boards: null, published: false },
      newFields: { boards: 3, published: true },
      labels: { boards: 'Boards built', published: 'Published' },
    });
    const boards = w.find('[data-field="boards"] dd');
    expect(boards.attributes('data-kind')).toBe('value');
    expect(boards.find('del').text()).toBe('(none)');
    expect(boards.find('ins').text()).toBe('3');
    expect(boards.text()).toContain('→');
    const published = w.find('[data-field="published"] dd');
    expect([published.find('del').text(), published.find('ins').text()]).toEqual(['no', 'yes']);
  });

  it('shows the whole old and new text instead of word marks when word highlighting is off', () => {
    const summary = mountFields({ words: false }).find('[data-field="summary"] dd');
    expect(summary.find('del').text()).toBe('A 5 V bench supply with current limit');
    expect(summary.find('ins').text()).toBe('A 12 V bench supply with current limit');
    expect(summary.text()).toContain('Before:');
    expect(summary.text()).toContain('After:');
  });
});
