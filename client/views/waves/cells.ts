import { h, type VNode } from 'vue';

/** Every reference of a list in full, wrapping between references (never inside one), no hovering needed. */
export function refList(refs: readonly string[], label?: (ref: string) => string): VNode {
  return h(
    'div',
    { class: 'aw-ref-list' },
    refs.map((r) => h('span', { key: r }, label ? label(r) : r)),
  );
}
