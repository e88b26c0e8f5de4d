import { mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { clientBuildInputs, clientBuildIsFresh } from '../../server/client-build';

describe('client build freshness (npm start rebuilds only when stale)', () => {
  let root: string;
  const at = (seconds: number) => new Date(Date.UTC(2026, 0, 1, 0, 0, seconds));
  const write = (relative: string, seconds: number) => {
    const file = path.join(root, relative);
    mkdirSync(path.dirname(file), { recursive: true });
    writeFileSync(file, relative);
    utimesSync(file, at(seconds), at(seconds));
  };

  beforeEach(() => {
    root = mkdtempSync(path.join(os.tmpdir(), 'spreadproof-build-'));
    write('client/src/main.ts', 10);
    write('shared/engine/evaluate.ts', 10);
    write('angular.json', 10);
    write('tsconfig.json', 10);
    // Folder mtimes count too (a deleted file changes its folder); pin them to the same time.
    for (const dir of ['client/src', 'client', 'shared/engine', 'shared']) utimesSync(path.join(root, dir), at(10), at(10));
  });
  afterEach(() => rmSync(root, { recursive: true, force: true }));

  it('is stale without a build', async () => {
    expect(await clientBuildIsFresh(root)).to.equal(false);
  });

  it('is stale with an index.html but no stamp (an interrupted or foreign build)', async () => {
    write('dist/client/browser/index.html', 20);
    expect(await clientBuildIsFresh(root)).to.equal(false);
  });

  it('is fresh when the stamp is newer than every input', async () => {
    write('dist/client/browser/index.html', 20);
    write('dist/client/.build-stamp', 20);
    expect(await clientBuildIsFresh(root)).to.equal(true);
  });

  for (const input of ['client/src/app/new-page.ts', 'shared/engine/evaluate.ts', 'angular.json', 'tsconfig.json']) {
    it(`is stale after a change to ${input}`, async () => {
      write('dist/client/browser/index.html', 20);
      write('dist/client/.build-stamp', 20);
      write(input, 30);
      expect(await clientBuildIsFresh(root)).to.equal(false);
    });
  }

  it('watches client/, shared/, angular.json and tsconfig.json', () => {
    expect(clientBuildInputs).to.deep.equal(['client', 'shared', 'angular.json', 'tsconfig.json']);
  });
});
