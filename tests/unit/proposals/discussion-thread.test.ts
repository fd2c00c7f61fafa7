// @vitest-environment happy-dom
/**
 * The discussion thread shows what `load` gives, posts through `post` and appends what the
 * server answered; signed-out readers are offered sign-in instead of a form.
 */
import '../editor/vuetify-env';
import type { Comment, CommentList } from '@shared/contracts/errata';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createVuetify } from 'vuetify';
import DiscussionThread from '@/components/discussion/DiscussionThread.vue';
import { ApiError } from '@/composables/http';
import { useSessionStore } from '@/stores/session';
import { people, signedInAs } from './fake-server';

const first: Comment = {
  id: 11,
  author: people.maker,
  body: 'Which **regulator** part did you fit?',
  html: '<p>Which <strong>regulator</strong> part did you fit?</p>',
  createdAt: '2026-03-01T09:00:00.000Z',
};

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
  document.body.innerHTML = '';
});

async function mountThread(list: CommentList, post = vi.fn<(body: string) => Promise<Comment>>()) {
  wrapper = mount(DiscussionThread, {
    props: { load: async () => list, post, label: 'Discussion of this proposal' },
    global: { plugins: [createVuetify()] },
    attachTo: document.body,
  });
  await flushPromises();
  return { wrapper, post };
}

describe('DiscussionThread', () => {
  it('shows each comment with its author and its rendered HTML', async () => {
    const { wrapper } = await mountThread({ items: [first], canComment: false });
    const comment = wrapper.get('[data-comment="11"]');
    expect(comment.text()).toContain('Odile Fenn');
    expect(comment.text()).toContain('@odile-fenn');
    expect(comment.get('.discussion-thread__body strong').text()).toBe('regulator');
    expect(comment.get('time').attributes('datetime')).toBe('2026-03-01T09:00:00.000Z');
    expect(wrapper.get('h2').text()).toBe('Discussion of this proposal');
  });

  it('posts the Markdown written in the form and appends the comment the server answered', async () => {
    useSessionStore().user = signedInAs(people.contributor);
    const answered: Comment = {
      id: 12,
      author: people.contributor,
      body: 'An `AP2112K`, rated 600 mA.',
      html: '<p>An <code>AP2112K</code>, rated 600 mA.</p>',
      createdAt: '2026-03-02T10:00:00.000Z',
    };
    const post = vi.fn(async () => answered);
    const { wrapper } = await mountThread({ items: [first], canComment: true }, post);

    await wrapper.get('textarea').setValue('An `AP2112K`, rated 600 mA.');
    await wrapper.get('form').trigger('submit');
    await flushPromises();

    expect(post).toHaveBeenCalledWith('An `AP2112K`, rated 600 mA.');
    expect(wrapper.findAll('[data-comment]').map((c) => c.attributes('data-comment'))).toEqual(['11', '12']);
    expect(wrapper.get('[data-comment="12"] code').text()).toBe('AP2112K');
    expect((wrapper.get('textarea').element as HTMLTextAreaElement).value).toBe('');
    expect(wrapper.text()).toContain('2 comments');
  });

  it('does not post an empty comment', async () => {
    useSessionStore().user = signedInAs(people.contributor);
    const { wrapper, post } = await mountThread({ items: [], canComment: true });
    await wrapper.get('textarea').setValue('   ');
    await wrapper.get('form').trigger('submit');
    await flushPromises();
    expect(post).not.toHaveBeenCalled();
    expect(wrapper.text()).toContain('Write something first');
  });

  it('shows the server’s validation message and keeps what was typed', async () => {
    useSessionStore().user = signedInAs(people.contributor);
    const post = vi.fn(async () => {
      throw new ApiError(422, 'validation_failed', 'Check the comment', {
        issues: [{ path: 'body', message: 'Comment contains a character that cannot be stored' }],
      });
    });
    const { wrapper } = await mountThread({ items: [], canComment: true }, post);
    await wrapper.get('textarea').setValue('Odd text');
    await wrapper.get('form').trigger('submit');
    await flushPromises();
    expect(wrapper.text()).toContain('Comment contains a character that cannot be stored');
    expect((wrapper.get('textarea').element as HTMLTextAreaElement).value).toBe('Odd text');
  });

  it('asks signed-out readers to sign in instead of showing a form', async () => {
    const { wrapper } = await mountThread({ items: [first], canComment: false });
    expect(wrapper.find('form').exists()).toBe(false);
    expect(wrapper.get('[data-testid="sign-in-to-comment"]').text()).toBe('Sign in to join the discussion');
  });

  it('says so when a signed-in member may not comment', async () => {
    useSessionStore().user = signedInAs(people.contributor);
    const { wrapper } = await mountThread({ items: [], canComment: false });
    expect(wrapper.find('form').exists()).toBe(false);
    expect(wrapper.find('[data-testid="sign-in-to-comment"]').exists()).toBe(false);
    expect(wrapper.find('[data-testid="comments-closed"]').exists()).toBe(true);
  });
});
