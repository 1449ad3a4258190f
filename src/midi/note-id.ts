/**
 * Which physical key a note comes from: an input source (device), its channel and key. One
 * number, so maps keyed by it stay cheap; built and read only here.
 */
export type NoteId = number & { readonly __noteId: unique symbol };

export function noteId(source: number, channel: number, key: number): NoteId {
  return (source * 2048 + channel * 128 + key) as NoteId;
}

export const sourceOf = (id: NoteId): number => Math.floor(id / 2048);
export const channelOf = (id: NoteId): number => Math.floor(id / 128) % 16;
export const keyOfNote = (id: NoteId): number => id % 128;
