/** The demo problems offered in the picker (metadata only; the worker builds them). */
import { DEMOS } from '../core/problems/demos.ts';

export const DEMO_CHOICES: readonly { id: string; title: string }[] = DEMOS.map((d) => ({ id: d.id, title: d.title }));

/** The problem the page opens with: the 1-D borehole log. */
export const DEFAULT_DEMO = DEMO_CHOICES.find((d) => d.id === 'borehole-log')?.id ?? DEMO_CHOICES[0]?.id ?? 'borehole-log';
