import type { RouteLocationRaw } from 'vue-router';

/** One labelled fact on a detail screen; `to` makes the value a link. */
export interface Fact {
  label: string;
  value: string;
  to?: RouteLocationRaw;
}
