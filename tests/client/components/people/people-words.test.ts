import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import LinkifiedText from '../../../../src/components/people/LinkifiedText.vue';

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
