import { CanDeactivateFn } from '@angular/router';

/** A page that can hold unsaved work and asks before it is left. */
export interface HoldsUnsavedWork {
  /** Resolves to true when the page may be left (nothing unsaved, or the user agreed). */
  confirmLeave(): Promise<boolean> | boolean;
}

/** Asks before leaving a page with unsaved work (the page itself asks, with its own dialog). */
export const unsavedWorkGuard: CanDeactivateFn<HoldsUnsavedWork> = (component) => component?.confirmLeave() ?? true;
