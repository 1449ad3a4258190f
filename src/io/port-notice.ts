import type { PortChange } from './midi-system.js';

/** What the live bridge tells the player about its ports: one came or went, or a message could not be sent. */
export type BridgeNotice =
  | { readonly kind: 'port'; readonly change: PortChange; readonly action: string }
  | { readonly kind: 'send-failed'; readonly error: string };
