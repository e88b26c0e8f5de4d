/**
 * Demo worksheets of the Harrow Vale Precision metrology lab, built from the example documents in
 * examples/ as a short history each: the analyst enters readings, adds the interval and the test,
 * then the checks; the colleague forks the bore-gauge qualification at 99 %; the reviewer approves
 * one revision and asks for changes on another; the analyst publishes a read-only link.
 *
 * Idempotent: a demo worksheet whose title already exists in the demo team is left as it is (with
 * everything users did to it since), so a second start changes nothing.
 *
 * Evaluation runs in-process (the seed runs before the server listens, on small worksheets); it is
 * the same engine and the same table reader the worker pool uses, so the results are identical.
 */
import { createHmac } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { and, eq, isNull } from 'drizzle-orm';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { evaluate } from '@shared/engine/evaluate';
import type { Table } from '@shared/engine/table/parse';
import { ENGINE_VERSION } from '@shared/engine/version';
import type { Step, Worksheet } from '@shared/format/worksheet';
import { publishedLinks, reviewRequests, reviews, revisions, worksheets } from '../../schema/index';
import { recordAudit } from '../audit/audit';
import type { Database } from '../db/client';
import { detectMediaType, parsedInfo, readTable } from '../datasets/parse';
import { storeDataset } from '../datasets/store';
import type { Evaluated } from '../evaluation/evaluator';
import { examplesDir, findExample } from '../worksheets/examples';
import { createWorksheet, datasetIdsOf, insertRevision, prepareDocument, type PreparedDocument } from '../worksheets/service';
import { tokenHash } from '../publishing/routes';

export interface DemoPeople {
  teamId: string;
  /** By e-mail address, as returned by seedDemo(). */
  userIds: Record<string, string>;
}

export interface DemoWorksheetsSeed {
  created: string[];
  /** App-relative path of the demo's published link, or null when it has been revoked. */
  publishedPath: string | null;
}

const analyst = 'ines.okafor@harrowvale.test';
const colleague = 'tomas.lindqvist@harrowvale.test';
const reviewer = 'priya.raman@harrowvale.test';

const boreTitle = 'Bore gauge BG-07 repeatability qualification';
const forkTitle = 'Bore gauge BG-07 at 99 % confidence';

interface RevisionPlan {
  author: string;
  message: string;
  document: Worksheet;
}

/** The example with only some of its steps, optionally changed. */
function stepsOf(document: Worksheet, ids: string[], change: (step: Step) => Step = (s) => s): Worksheet {
  const byId = new Map(document.steps.map((s) => [s.id, s]));
  return { ...document, steps: ids.map((id) => change(structuredClone(byId.get(id)!))) };
}

function example(id: string): Worksheet {
  const found = findExample(id);
  if (!found) throw new Error(`The demo seed needs examples/${id}.json, which is missing or not a valid worksheet.`);
  return found.document;
}

class SeedEvaluator {
  private readonly tables = new Map<string, Table>();

  async addFile(db: Database, name: string, teamId: string, userId: string): Promise<string> {
    const bytes = new Uint8Array(readFileSync(path.join(examplesDir, name)));
    const mediaType = detectMediaType(bytes, name);
    const { table, sheet } = await readTable(bytes, mediaType);
    const id = sha256Hex(bytes);
    await storeDataset(db, { id, bytes, mediaType, parsed: parsedInfo(table, sheet), name, teamId, userId });
    this.tables.set(id, table);
    return id;
  }

  evaluate(prepared: PreparedDocument): Evaluated {
    const datasets: Record<string, Table> = {};
    for (const id of datasetIdsOf(prepared.document)) datasets[id] = this.tables.get(id)!;
    const resultsJson = canonicalJson(evaluate(prepared.document, datasets));
    return { resultsJson, resultsHash: sha256Hex(resultsJson), engineVersion: ENGINE_VERSION, elapsedMs: 0, cached: false };
  }
}

async function worksheetByTitle(db: Database, teamId: string, title: string): Promise<{ id: string; head: string | null } | undefined> {
  const [row] = await db
    .select({ id: worksheets.id, head: worksheets.headRevisionId })
    .from(worksheets)
    .where(and(eq(worksheets.teamId, teamId), eq(worksheets.title, title)))
    .limit(1);
  return row;
}

/** Creates the worksheet with its revisions in order; returns the revision ids. */
async function createHistory(
  db: Database,
  ev: SeedEvaluator,
  people: DemoPeople,
  plans: RevisionPlan[],
  options: { originRevisionId?: string } = {},
): Promise<{ worksheetId: string; revisionIds: string[] }> {
  return db.transaction(async (tx) => {
    const [first, ...rest] = plans;
    const prepared = prepareDocument(first.document);
    const firstUser = people.userIds[first.author];
    const ids = await createWorksheet(tx, {
      teamId: people.teamId,
      userId: firstUser,
      prepared,
      evaluated: ev.evaluate(prepared),
      message: first.message,
      originRevisionId: options.originRevisionId ?? null,
    });
    await recordAudit(tx, {
      teamId: people.teamId,
      actorId: firstUser,
      action: options.originRevisionId ? 'worksheet.fork' : 'worksheet.create',
      objectType: 'worksheet',
      objectId: ids.worksheetId,
      worksheetId: ids.worksheetId,
      details: { seed: true, revisionId: ids.revisionId, contentHash: prepared.contentHash, originRevisionId: options.originRevisionId },
    });
    const revisionIds = [ids.revisionId];
    for (const [i, plan] of rest.entries()) {
      const p = prepareDocument(plan.document);
      const evaluated = ev.evaluate(p);
      const id = await insertRevision(tx, {
        worksheetId: ids.worksheetId,
        number: i + 2,
        parentId: revisionIds[revisionIds.length - 1],
        authorId: people.userIds[plan.author],
        message: plan.message,
        prepared: p,
        evaluated,
      });
      await recordAudit(tx, {
        teamId: people.teamId,
        actorId: people.userIds[plan.author],
        action: 'revision.save',
        objectType: 'revision',
        objectId: id,
        worksheetId: ids.worksheetId,
        details: { seed: true, number: i + 2, contentHash: p.contentHash, resultsHash: evaluated.resultsHash },
      });
      revisionIds.push(id);
    }
    return { worksheetId: ids.worksheetId, revisionIds };
  });
}

async function addVerdict(db: Database, people: DemoPeople, revisionId: string, worksheetId: string, verdict: 'approved' | 'changes_requested', comment: string): Promise<void> {
  const [rev] = await db.select({ contentHash: revisions.contentHash }).from(revisions).where(eq(revisions.id, revisionId));
  await db.transaction(async (tx) => {
    const [request] = await tx
      .insert(reviewRequests)
      .values({ revisionId, requestedBy: people.userIds[analyst], reviewerId: people.userIds[reviewer], message: 'Please review before I file the qualification record.' })
      .returning({ id: reviewRequests.id });
    await recordAudit(tx, { teamId: people.teamId, actorId: people.userIds[analyst], action: 'review.request', objectType: 'review_request', objectId: request.id, worksheetId, details: { seed: true, revisionId } });
    const [row] = await tx
      .insert(reviews)
      .values({ revisionId, reviewerId: people.userIds[reviewer], verdict, comment, contentHash: rev.contentHash })
      .returning({ id: reviews.id });
    await recordAudit(tx, { teamId: people.teamId, actorId: people.userIds[reviewer], action: 'review.verdict', objectType: 'review', objectId: row.id, worksheetId, details: { seed: true, revisionId, verdict, contentHash: rev.contentHash } });
  });
}

/**
 * The demo link's token is derived from the server's secret, so each start can print the URL
 * again without the token ever being stored (only its hash is, as for every link).
 */
export function demoLinkToken(secret: string): string {
  return createHmac('sha256', secret).update('spreadproof demo published link').digest('base64url');
}

export async function seedDemoWorksheets(db: Database, people: DemoPeople, options: { linkSecret: string }): Promise<DemoWorksheetsSeed> {
  const ev = new SeedEvaluator();
  const created: string[] = [];
  const token = demoLinkToken(options.linkSecret);

  // 1. Bore-gauge repeatability qualification against a required sigma of 0.5 um.
  const bore = example('bore-gauge-repeatability');
  let boreIds: { worksheetId: string; revisionIds: string[] } | undefined;
  if (!(await worksheetByTitle(db, people.teamId, bore.title))) {
    const at95 = (s: Step) => (s.kind === 'sigma-interval' ? { ...s, params: { ...s.params, levels: [0.95] } } : s);
    boreIds = await createHistory(db, ev, people, [
      { author: analyst, message: 'Readings from the SR-40 session', document: stepsOf(bore, ['readings', 'about', 'spread']) },
      { author: analyst, message: 'Upper bound at 95 % and the test against 0.5 um', document: stepsOf(bore, ['readings', 'about', 'spread', 'bound', 'requirement'], at95) },
      { author: analyst, message: 'Normality check; bounds at 90, 95 and 99 %', document: stepsOf(bore, ['readings', 'about', 'spread', 'shape', 'bound', 'requirement']) },
      { author: colleague, message: 'Readings needed for the yearly requalification', document: bore },
    ]);
    created.push(bore.title);
    const head = boreIds.revisionIds[3];
    await addVerdict(db, people, head, boreIds.worksheetId, 'approved', 'Upper 95 % bound is below 0.5 um and normality is not rejected. Approved for the qualification record.');
    await db.transaction(async (tx) => {
      const [link] = await tx.insert(publishedLinks).values({ revisionId: head, tokenHash: tokenHash(token), createdBy: people.userIds[analyst] }).onConflictDoNothing().returning({ id: publishedLinks.id });
      if (link) {
        await recordAudit(tx, { teamId: people.teamId, actorId: people.userIds[analyst], action: 'link.publish', objectType: 'link', objectId: link.id, worksheetId: boreIds!.worksheetId, details: { seed: true, revisionId: head } });
      }
    });
  }

  // 2. The colleague's fork of the approved revision at 99 % confidence.
  if (!(await worksheetByTitle(db, people.teamId, forkTitle))) {
    const source = await worksheetByTitle(db, people.teamId, bore.title);
    if (source?.head) {
      const [head] = await db.select({ content: revisions.content }).from(revisions).where(eq(revisions.id, source.head));
      const base = JSON.parse(head.content) as Worksheet;
      const at99 = (s: Step): Step => {
        if (s.kind === 'sigma-interval') return { ...s, params: { ...s.params, levels: [0.99] } };
        if (s.kind === 'target-test') return { ...s, params: { ...s.params, alpha: 0.01 } };
        return s;
      };
      const forked: Worksheet = { ...base, title: forkTitle, steps: base.steps.map(at99) };
      await createHistory(db, ev, people, [{ author: colleague, message: 'Forked at 99 % confidence (bound and test at alpha 0.01)', document: forked }], {
        originRevisionId: source.head,
      });
      created.push(forkTitle);
    }
  }

  // 3. Two suppliers' shaft-diameter spread: typed in first, then the lab's CSV export.
  const shafts = example('supplier-shafts');
  if (!(await worksheetByTitle(db, people.teamId, shafts.title))) {
    const datasetId = await ev.addFile(db, 'supplier-shafts.csv', people.teamId, people.userIds[colleague]);
    const fromFile = (s: Step): Step =>
      s.kind === 'data'
        ? { ...s, title: 'Shaft diameters (lab export)', params: { origin: 'dataset', datasetId, fileName: 'supplier-shafts.csv', columns: [{ name: 'diameter', unit: 'mm' }] } }
        : s;
    await createHistory(db, ev, people, [
      { author: colleague, message: 'Diameters typed in from the inspection sheets', document: stepsOf(shafts, ['shafts', 'deviation', 'by-supplier']) },
      { author: colleague, message: 'Data replaced by the CMM export; normality per supplier', document: stepsOf(shafts, ['shafts', 'deviation', 'by-supplier', 'shape-corran', 'shape-ashby'], fromFile) },
      { author: analyst, message: 'F test of Ashby against Corran; shafts needed per supplier', document: stepsOf(shafts, shafts.steps.map((s) => s.id), fromFile) },
    ]);
    created.push(shafts.title);
  }

  // 4. Three lines compared, with capability of line 1; the reviewer asked for the sigma interval.
  const lines = example('line-capability');
  if (!(await worksheetByTitle(db, people.teamId, lines.title))) {
    const ids = await createHistory(db, ev, people, [
      { author: analyst, message: 'Bores of the three lines, spread by line', document: stepsOf(lines, ['bores', 'by-line', 'lines']) },
      { author: analyst, message: 'Normality and capability of line 1', document: stepsOf(lines, ['bores', 'by-line', 'lines', 'shape-line1', 'line1']) },
      { author: analyst, message: 'Sigma interval for line 1, as the review asked', document: lines },
    ]);
    await addVerdict(db, people, ids.revisionIds[1], ids.worksheetId, 'changes_requested', 'Please add a confidence interval for the sigma of line 1 before we quote Cpk to the customer.');
    created.push(lines.title);
  }

  const [link] = await db
    .select({ id: publishedLinks.id })
    .from(publishedLinks)
    .where(and(eq(publishedLinks.tokenHash, tokenHash(token)), isNull(publishedLinks.revokedAt)));
  return { created, publishedPath: link ? `/p/${token}` : null };
}
