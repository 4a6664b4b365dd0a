/** DOM id of a stage's card, so a problem can scroll to it. */
export function stageAnchor(stageId: string): string {
  return `plan-stage-${stageId.replace(/[^A-Za-z0-9_-]/g, '_')}`;
}
