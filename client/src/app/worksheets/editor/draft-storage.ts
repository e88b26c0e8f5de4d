/**
 * Unsaved drafts kept in the browser's localStorage, so that an edit survives a page reload.
 * A draft is keyed by worksheet and by the revision it was based on: a draft based on an older
 * revision is never silently applied on top of a newer one. No Angular here (unit-tested).
 */
import type { Worksheet } from '@shared/format/worksheet';

const PREFIX = 'spreadproof:draft:';

export interface StoredDraft {
  worksheetId: string;
  baseRevisionId: string;
  document: Worksheet;
  /** ISO time of the last edit. */
  savedAt: string;
}

/** The storage the drafts live in; `localStorage` in the app, a fake in tests. */
export interface KeyValueStore {
  readonly length: number;
  key(index: number): string | null;
  getItem(key: string): string | null;
  setItem(key: string, value: string): void;
  removeItem(key: string): void;
}

export function draftKey(worksheetId: string, baseRevisionId: string): string {
  return `${PREFIX}${worksheetId}:${baseRevisionId}`;
}

function browserStore(): KeyValueStore | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null; // storage disabled by the browser's privacy settings
  }
}

export class DraftStorage {
  constructor(private readonly store: KeyValueStore | null = browserStore()) {}

  /** Keeps the draft; false when the browser refused (storage full or disabled). */
  save(draft: StoredDraft): boolean {
    if (!this.store) return false;
    try {
      this.store.setItem(draftKey(draft.worksheetId, draft.baseRevisionId), JSON.stringify(draft));
      return true;
    } catch {
      return false;
    }
  }

  load(worksheetId: string, baseRevisionId: string): StoredDraft | null {
    return this.read(draftKey(worksheetId, baseRevisionId));
  }

  remove(worksheetId: string, baseRevisionId: string): void {
    try {
      this.store?.removeItem(draftKey(worksheetId, baseRevisionId));
    } catch {
      // nothing to do: the draft simply stays
    }
  }

  /** Drafts of the worksheet based on other revisions than `exceptBaseRevisionId`, newest first. */
  others(worksheetId: string, exceptBaseRevisionId: string): StoredDraft[] {
    if (!this.store) return [];
    const found: StoredDraft[] = [];
    const prefix = `${PREFIX}${worksheetId}:`;
    for (let i = 0; i < this.store.length; i++) {
      const key = this.store.key(i);
      if (!key || !key.startsWith(prefix) || key === draftKey(worksheetId, exceptBaseRevisionId)) continue;
      const draft = this.read(key);
      if (draft) found.push(draft);
    }
    return found.sort((a, b) => (a.savedAt < b.savedAt ? 1 : -1));
  }

  private read(key: string): StoredDraft | null {
    try {
      const text = this.store?.getItem(key);
      if (!text) return null;
      const value = JSON.parse(text) as Partial<StoredDraft>;
      if (
        typeof value.worksheetId !== 'string' ||
        typeof value.baseRevisionId !== 'string' ||
        typeof value.savedAt !== 'string' ||
        typeof value.document !== 'object' ||
        value.document === null ||
        !Array.isArray((value.document as { steps?: unknown }).steps)
      ) {
        return null;
      }
      return value as StoredDraft;
    } catch {
      return null;
    }
  }
}
