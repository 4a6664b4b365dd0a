import { flushPromises, mount } from '@vue/test-utils';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import SignInPage from '../../../../src/pages/auth/SignInPage.vue';
import { SIGN_IN_WAIT_WORDS, waitShort } from '../../../../src/words/sign-in';
import { mockFetchWithStores } from '../../api-fakes';

vi.mock('vue-router', () => ({ useRoute: () => ({ query: {} }), useRouter: () => ({ replace: vi.fn() }) }));

/** Quasar's package resolves to its server build under happy-dom: its controls are stood in for by plain elements. */
const stubs = {
  'q-form': { emits: ['submit'], template: `<form @submit.prevent="$emit('submit', $event)"><slot /></form>` },
  'q-input': { props: ['modelValue', 'label'], emits: ['update:modelValue'], template: `<input :aria-label="label" :value="modelValue" @input="$emit('update:modelValue', $event.target.value)" />` },
  'q-btn': { props: ['label', 'disable', 'loading', 'type'], template: `<button :type="type || 'button'" :disabled="disable || loading">{{ label }}</button>` },
  'router-link': { template: '<a><slot /></a>' },
  BrandMark: true,
  SafetyNotice: true,
};

/** The server's answer to a sign-in that must wait: 429 with Retry-After, as server/routes/auth.ts sends it. */
function tooMany(seconds: number): Response {
  const body = { error: { code: 'rate_limited', message: `Too many failed sign-ins for this account from here. Wait ${seconds} seconds and try again, or reset your password.` } };
  return new Response(JSON.stringify(body), { status: 429, headers: { 'Content-Type': 'application/json', 'Retry-After': String(seconds) } });
}
function wrongPassword(): Response {
  const body = { error: { code: 'bad_credentials', message: 'That e-mail and password do not match an account. Check both and try again.' } };
  return new Response(JSON.stringify(body), { status: 401, headers: { 'Content-Type': 'application/json' } });
}

describe('the sign-in page after too many failed sign-ins', () => {
  const fetchMock = mockFetchWithStores();
  beforeEach(() => {
    vi.useFakeTimers({ toFake: ['setInterval', 'clearInterval', 'Date'] });
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  async function signInPage() {
    const wrapper = mount(SignInPage, { global: { stubs } });
    await wrapper.find('input[aria-label="E-mail"]').setValue('rigger@example.test');
    await wrapper.find('input[aria-label="Password"]').setValue('not-the-password');
    return wrapper;
  }
  const button = (wrapper: Awaited<ReturnType<typeof signInPage>>) => wrapper.find('button[type="submit"]');
  async function submit(wrapper: Awaited<ReturnType<typeof signInPage>>) {
    await wrapper.find('form').trigger('submit');
    await flushPromises();
  }

  it('shuts Sign in for the Retry-After seconds with a countdown in its label, then opens it and clears the message', async () => {
    fetchMock.mockResolvedValueOnce(tooMany(3));
    const wrapper = await signInPage();
    await submit(wrapper);

    expect(button(wrapper).attributes('disabled')).toBeDefined();
    expect(button(wrapper).text()).toBe('Try again in 3 s');
    expect(wrapper.find('[role="alert"]').text()).toBe(SIGN_IN_WAIT_WORDS);

    // Tapping again while it waits sends nothing (a form submitted by the Enter key included).
    await submit(wrapper);
    expect(fetchMock).toHaveBeenCalledTimes(1);

    await vi.advanceTimersByTimeAsync(1000);
    expect(button(wrapper).text()).toBe('Try again in 2 s');
    await vi.advanceTimersByTimeAsync(1000);
    expect(button(wrapper).text()).toBe('Try again in 1 s');
    expect(button(wrapper).attributes('disabled')).toBeDefined();
    await vi.advanceTimersByTimeAsync(1000);

    expect(button(wrapper).text()).toBe('Sign in');
    expect(button(wrapper).attributes('disabled')).toBeUndefined();
    expect(wrapper.find('[role="alert"]').exists()).toBe(false);

    fetchMock.mockResolvedValueOnce(wrongPassword());
    await submit(wrapper);
    expect(fetchMock).toHaveBeenCalledTimes(2);
    expect(wrapper.find('[role="alert"]').text()).toMatch(/do not match an account/);
    expect(button(wrapper).attributes('disabled')).toBeUndefined();
  });

  it('counts a long wait down in minutes and seconds', async () => {
    fetchMock.mockResolvedValueOnce(tooMany(900));
    const wrapper = await signInPage();
    await submit(wrapper);
    expect(button(wrapper).text()).toBe('Try again in 15 min 00 s');
    await vi.advanceTimersByTimeAsync(61_000);
    expect(button(wrapper).text()).toBe('Try again in 13 min 59 s');
    wrapper.unmount();
  });

  it('writes a wait in a button’s few words', () => {
    expect([0, 1, 59, 60, 125, 900].map(waitShort)).toEqual(['0 s', '1 s', '59 s', '1 min 00 s', '2 min 05 s', '15 min 00 s']);
  });
});
