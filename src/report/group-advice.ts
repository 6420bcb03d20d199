import type { GroupMean } from '../stats/groups/index.js';
import { sig } from './format.js';

/**
 * The sentence that says what would narrow a group's interval: more seeds, more episodes, or
 * either, from the episodes' share of the group mean's variance (docs/methods.md §15.2).
 */
export function groupAdviceText(group: GroupMean): string {
  const episodes = Math.round(group.episodeShare * 100);
  const floor = sig(group.halfWidthWithUnlimitedEpisodes, 3);
  if (group.advice === 'more-seeds') {
    return `More episodes will not narrow this: ${100 - episodes}% of the uncertainty is which policy training produced, and even unlimited episodes per member would leave ±${floor}. Train more seeds.`;
  }
  if (group.advice === 'more-episodes') {
    return `The episodes make ${episodes}% of the uncertainty: run more episodes per member (--episodes) before training more seeds.`;
  }
  return `Seeds and episodes both count (${episodes}% of the uncertainty from episodes, ±${floor} would remain with unlimited episodes): more of either narrows it; 'reckon plan --group ... --seed-cost T' says which is cheaper.`;
}
