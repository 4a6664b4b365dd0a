import { afterEach, describe, expect, it, vi } from 'vitest';
import { defineComponent, h } from 'vue';
import { mount } from '@vue/test-utils';

/** A browser's screen wake lock, faked: each request answers what the test queued. */
function fakeWakeLock(answers: ('grant' | 'refuse')[]) {
  const sentinels: { released: boolean; release: () => Promise<void>; fire: () => void }[] = [];
  const request = vi.fn(async () => {
    if (answers.shift() === 'refuse') throw new DOMException('Battery saver is on', 'NotAllowedError');
    let onRelease = () => undefined as void;
    const sentinel = {
      released: false,
      release: async () => {
        sentinel.released = true;
        onRelease();
      },
      addEventListener: (_type: 'release', listener: () => void) => {
        onRelease = listener;
      },
      // The browser drops the lock by itself when the tab is hidden.
      fire: () => {
        sentinel.released = true;
        onRelease();
      },
    };
    sentinels.push(sentinel);
    return sentinel;
  });
  Object.defineProperty(navigator, 'wakeLock', { value: { request }, configurable: true });
  return { request, sentinels };
}

function setVisibility(state: 'visible' | 'hidden') {
  Object.defineProperty(document, 'visibilityState', { value: state, configurable: true });
  document.dispatchEvent(new Event('visibilitychange'));
}

/** A fresh module each time: whether the browser has the API is read when the module loads. */
async function mountUser() {
  vi.resetModules();
  const { useWakeLock } = await import('../../../src/composables/useWakeLock');
  let state!: ReturnType<typeof useWakeLock>;
  const View = defineComponent({
    setup() {
      state = useWakeLock();
      return () => h('div');
    },
  });
  const wrapper = mount(View);
  await new Promise((resolve) => setTimeout(resolve, 0));
  return { wrapper, state };
}

describe('the board views keep the screen awake', () => {
  afterEach(() => {
    Reflect.deleteProperty(navigator, 'wakeLock');
    setVisibility('visible');
  });

  it('asks for the lock when a view opens, again when the tab comes back, and gives it back when the view closes', async () => {
    setVisibility('visible');
    const lock = fakeWakeLock(['grant', 'grant']);
    const { wrapper, state } = await mountUser();
    expect(lock.request).toHaveBeenCalledWith('screen');
    expect(state.active.value).toBe(true);
    expect(state.failed.value).toBe(false);

    lock.sentinels[0]!.fire();
    setVisibility('hidden');
    expect(state.active.value).toBe(false);
    setVisibility('visible');
    await new Promise((resolve) => setTimeout(resolve, 0));
    expect(lock.request).toHaveBeenCalledTimes(2);
    expect(state.active.value).toBe(true);

    wrapper.unmount();
    expect(lock.sentinels[1]!.released).toBe(true);
  });

  it('says the screen may sleep when refused, and asks again at the next tap', async () => {
    setVisibility('visible');
    const lock = fakeWakeLock(['refuse', 'grant']);
    const { wrapper, state } = await mountUser();
    expect(state.failed.value).toBe(true);
    expect(state.active.value).toBe(false);
    document.dispatchEvent(new Event('pointerdown'));
    await new Promise((resolve) => setTimeout(resolve, 0));
    expect(lock.request).toHaveBeenCalledTimes(2);
    expect(state.failed.value).toBe(false);
    expect(state.active.value).toBe(true);
    wrapper.unmount();
  });

  it('says the screen may sleep where the browser has no wake lock at all', async () => {
    const { wrapper, state } = await mountUser();
    expect(state.supported).toBe(false);
    expect(state.failed.value).toBe(true);
    wrapper.unmount();
  });
});
