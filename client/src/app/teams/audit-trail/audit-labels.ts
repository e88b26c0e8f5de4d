/** Plain words for the audit actions the server writes (shared/api and server/audit). Pure. */

export const AUDIT_ACTION_LABEL: Readonly<Record<string, string>> = {
  'worksheet.create': 'created a worksheet',
  'worksheet.import': 'imported a worksheet',
  'worksheet.archive': 'archived a worksheet',
  'worksheet.restore': 'restored a worksheet',
  'worksheet.fork': 'forked a worksheet',
  'revision.save': 'saved a revision',
  'dataset.upload': 'uploaded a dataset',
  'link.publish': 'published a revision',
  'link.revoke': 'revoked a public link',
  'review.request': 'asked for a review',
  'review.verdict': 'gave a review verdict',
};

/** The actions offered in the filter, in the order of a worksheet's life. */
export const AUDIT_ACTIONS: readonly string[] = Object.keys(AUDIT_ACTION_LABEL);

export function auditActionLabel(action: string): string {
  return AUDIT_ACTION_LABEL[action] ?? action;
}

/** Up to `limit` short "key: value" pairs of an event's details (primitive values only). */
export function auditDetailPairs(details: Record<string, unknown> | null | undefined, limit = 4): { key: string; value: string }[] {
  if (!details) return [];
  const pairs: { key: string; value: string }[] = [];
  for (const [key, value] of Object.entries(details)) {
    if (pairs.length >= limit) break;
    if (value === null || value === undefined || typeof value === 'object') continue;
    let text = String(value);
    // Hashes and ids are long; their start identifies them well enough in a list.
    if (/^[0-9a-f]{40,}$/i.test(text)) text = text.slice(0, 10);
    else if (/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(text)) text = text.slice(0, 8);
    if (text.length > 80) text = `${text.slice(0, 77)}…`;
    pairs.push({ key: key.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase(), value: text });
  }
  return pairs;
}
