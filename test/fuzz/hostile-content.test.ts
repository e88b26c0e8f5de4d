/**
 * Hostile Markdown, LaTeX and titles through the whole path a reader sees: saved through the API,
 * stored, published, and read back from the public link. Notes are random mixtures (fast-check)
 * of script tags, event handlers, javascript: and data: links, mXSS shapes, and KaTeX commands
 * that need trust (\href, \url, \html…, \includegraphics) or blow up (recursive macros, huge
 * rules). The HTML the engine stored for every note is checked by an independent parser
 * (html-check.ts); titles, step titles, column names and units come back verbatim as JSON text
 * (they are never HTML), and the public answer is JSON with nosniff and the strict CSP.
 * The published page itself is checked in Chromium by test/browser/published-hostile-content.test.ts.
 */
import { expect } from 'chai';
import fc from 'fast-check';
import { openServiceApp, teamOfRoles, type ServiceHarness, type TeamOfRoles } from '../server/worksheets-support';
import { Client } from '../server/support';
import { fuzzSeed, hostileRuns, inLanes } from './checks';
import { hostileDocument, markdownFragments } from './generators';
import { htmlProblems } from './html-check';

const hostileTitles = [
  '<img src=x onerror="window.__spreadproofPwned=1">',
  '"><script>window.__spreadproofPwned=1</script>',
  '{{constructor.constructor("window.__spreadproofPwned=1")()}}',
  "javascript:window.__spreadproofPwned=1//",
  '<svg/onload=window.__spreadproofPwned=1>',
  '$\\href{javascript:alert(1)}{x}$ ${alert(1)}',
];

const hostileNote = fc
  .array(fc.oneof({ weight: 4, arbitrary: fc.constantFrom(...markdownFragments) }, { weight: 1, arbitrary: fc.string({ maxLength: 20 }) }), { minLength: 1, maxLength: 10 })
  .map((parts) => parts.join(' '));

describe('fuzz: hostile notes and titles cannot run script where they are shown', function () {
  this.timeout(Math.max(120_000, hostileRuns * 400));
  let harness: ServiceHarness;
  let team: TeamOfRoles;

  before(async () => {
    harness = await openServiceApp({}, { maxThreads: 2 });
    team = await teamOfRoles(harness, 'Hostile Room');
  });
  after(() => harness?.close());

  it('the independent HTML check finds the dangerous shapes it must find', () => {
    expect(htmlProblems('<img src=x onerror=alert(1)>')).to.have.length.greaterThan(0);
    expect(htmlProblems('<a href="jav&#x09;ascript:alert(1)">x</a>')).to.have.length.greaterThan(0);
    expect(htmlProblems('<span style="background:url(http://x)">x</span>')).to.have.length.greaterThan(0);
    expect(htmlProblems('<a href="https://example.test/" rel="noopener">fine</a><span class="katex">x</span>')).to.deep.equal([]);
  });

  it(`stores, publishes and serves ${hostileRuns} hostile notes as HTML that runs nothing, and titles as plain text`, async () => {
    const notes = fc.sample(hostileNote, { numRuns: hostileRuns, seed: fuzzSeed + 2 });
    const perDocument = 5;
    const batches: string[][] = [];
    for (let i = 0; i < notes.length; i += perDocument) batches.push(notes.slice(i, i + perDocument));
    const { editor, owner } = team.clients;
    const failures: string[] = [];
    let htmlChecked = 0;
    let published = 0;

    await inLanes(batches, 3, async (batch, _lane, index) => {
      const title = hostileTitles[index % hostileTitles.length];
      const created = await editor.post(`/api/teams/${team.teamId}/worksheets`, { source: 'blank', title: 'Hostile' }).expect(201);
      const document = hostileDocument(title, batch);
      const saved = await editor.post(`/api/worksheets/${created.body.worksheet.id}/revisions`, { baseRevisionId: created.body.head.id, document });
      if (saved.status !== 201) {
        failures.push(`#${index}: save answered ${saved.status} ${JSON.stringify(saved.body).slice(0, 200)}`);
        return;
      }
      const check = (where: string, revision: { document: { title: string; steps: { title?: string }[] }; results: { steps: { stepId: string; html: string | null; error: unknown }[] } }) => {
        if (revision.document.title !== title) failures.push(`${where}: title changed to ${JSON.stringify(revision.document.title)}`);
        if (revision.document.steps[0].title !== title) failures.push(`${where}: step title changed`);
        for (const step of revision.results.steps) {
          if (!step.stepId.startsWith('note')) continue;
          if (step.error) failures.push(`${where}: note ${step.stepId} failed: ${JSON.stringify(step.error).slice(0, 200)}`);
          if (typeof step.html !== 'string') continue;
          htmlChecked += 1;
          for (const problem of htmlProblems(step.html)) failures.push(`${where} ${step.stepId}: ${problem} — from ${JSON.stringify(batch[Number(step.stepId.slice(4))]).slice(0, 200)}`);
        }
      };
      check(`#${index} saved`, saved.body.revision);
      // Every third worksheet is published and read back anonymously.
      if (index % 3 === 0) {
        const link = await owner.post(`/api/revisions/${saved.body.revision.id}/links`, {}).expect(201);
        const reader = new Client(harness.app);
        const res = await reader.get(`/api/public/${link.body.token}`).expect(200);
        published += 1;
        if (!/^application\/json/.test(res.headers['content-type'])) failures.push(`#${index}: public answer is ${res.headers['content-type']}`);
        if (res.headers['x-content-type-options'] !== 'nosniff') failures.push(`#${index}: public answer without nosniff`);
        if (!/script-src 'self'/.test(res.headers['content-security-policy'] ?? '')) failures.push(`#${index}: public answer without the CSP`);
        if (res.body.title !== title) failures.push(`#${index}: public title ${JSON.stringify(res.body.title)}`);
        check(`#${index} public`, res.body.revision);
      }
    });
    expect(htmlChecked).to.be.at.least(hostileRuns * 0.9);
    expect(published).to.be.greaterThan(0);
    expect(failures.slice(0, 20), `${failures.length} problems`).to.deep.equal([]);
  });
});
