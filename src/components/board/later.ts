import { defineAsyncComponent, ref, type AsyncComponentLoader, type Component } from 'vue';

const loaders: (() => Promise<unknown>)[] = [];

/** Becomes true at the first `loadLaterParts()`: parts rendered from the start (a menu) wait for it. */
export const laterPartsWanted = ref(false);

/**
 * A part of the board views that their first screen does not show (a closed or made-safe board,
 * the briefing, menus): its code is fetched when it is first shown, or by `loadLaterParts()`,
 * whichever comes first, so the first board on a slow phone waits for none of it.
 */
export function later<T extends Component>(loader: AsyncComponentLoader<T>): T {
  loaders.push(loader);
  return defineAsyncComponent(loader);
}

/**
 * Fetches every part made with `later()`, once. Called when the board has shown (or could not
 * open), or when someone reaches for a part first: a part first needed after the network has gone
 * (the job made safe in a dead spot) must already be here. A fetch that fails now is tried again
 * when the part is shown.
 */
export function loadLaterParts(): void {
  if (laterPartsWanted.value) return;
  laterPartsWanted.value = true;
  for (const load of loaders) void load().catch(() => undefined);
}

// The layout's parts that a live board's first screen leaves out. The plan store, the defect and
// plan-revision forms, the handover with its pickers and the record's hash come with them.
export const BriefingPanel = later(() => import('./BriefingPanel.vue'));
export const ClosedBoard = later(() => import('./ClosedBoard.vue'));
export const MadeSafeBoard = later(() => import('./shift/MadeSafeBoard.vue'));
export const MakeSafeChecklist = later(() => import('./shift/MakeSafeChecklist.vue'));
// The narrow header's menu: Quasar's menu and list come with it.
export const BoardMoreMenu = later(() => import('./BoardMoreMenu.vue'));
// The wide header's paper copy button (the narrow header has it in its menu).
export const PaperCopyButton = later(() => import('../common/PaperCopyButton.vue'));
