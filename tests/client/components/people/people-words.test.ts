import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import LinkifiedText from '../../../../src/components/people/LinkifiedText.vue';
import { formatWhen } from '../../../../src/services/time';

describe('formatWhen', () => {
  const now = new Date(2026, 10, 2, 15, 0); // 2 Nov 2026, 15:00 local

  it('shows only the 24-hour clock for today', () => {
    expect(formatWhen(new Date(2026, 10, 2, 7, 5).toISOString(), now)).toBe('07:05');
    expect(formatWhen(new Date(2026, 10, 2, 23, 59).toISOString(), now)).toBe('23:59');
  });

  it('puts the date in front on any other day', () => {
    expect(formatWhen(new Date(2026, 10, 1, 18, 30).toISOString(), now)).toBe('1 Nov 2026, 18:30');
  });

  it('hands back text it cannot read as a time', () => {
    expect(formatWhen('not a time', now)).toBe('not a time');
  });
});

describe('LinkifiedText', () => {
  it('turns web addresses into links and leaves the rest as text', () => {
    const text = 'Hello Ola,\nset your password here: http://localhost:3000/set-password?token=abc123def456.\nThanks';
    const wrapper = mount(LinkifiedText, { props: { text } });
    const links = wrapper.findAll('a');
    expect(links).toHaveLength(1);
    expect(links[0].attributes('href')).toBe('http://localhost:3000/set-password?token=abc123def456');
    expect(wrapper.text()).toContain('Thanks');
    expect(wrapper.text()).toContain('set your password here:');
  });

  it('never makes a link from other schemes', () => {
    const wrapper = mount(LinkifiedText, { props: { text: 'javascript:alert(1) and <b>bold</b>' } });
    expect(wrapper.findAll('a')).toHaveLength(0);
    expect(wrapper.find('b').exists()).toBe(false);
    expect(wrapper.text()).toBe('javascript:alert(1) and <b>bold</b>');
  });
});
