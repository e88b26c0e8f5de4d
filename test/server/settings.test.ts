// Settings read from the environment at start: a bad value must stop the start with a message
// naming the variable, and an absent one must give the documented default (README, scale-out).
// Common practice of twelve-factor services; no outside source.
import { expect } from 'chai';
import { msFromEnv } from '../../server/http/answer-cache';
import { poolSizeFromEnv } from '../../server/db/client';

describe('settings from the environment', () => {
  it('DATABASE_POOL_MAX: default 10, whole numbers 1 to 1000, anything else refused by name', () => {
    expect(poolSizeFromEnv({})).to.equal(10);
    expect(poolSizeFromEnv({ DATABASE_POOL_MAX: ' 25 ' })).to.equal(25);
    for (const bad of ['0', '-3', '2.5', 'many', '1001']) {
      expect(() => poolSizeFromEnv({ DATABASE_POOL_MAX: bad }), bad).to.throw(/DATABASE_POOL_MAX must be a whole number from 1 to 1000/);
    }
  });

  it('PUBLIC_LINK_CACHE_MS: 0 allowed (off), the default when unset or blank, anything else refused by name', () => {
    const saved = process.env.PUBLIC_LINK_CACHE_MS;
    try {
      delete process.env.PUBLIC_LINK_CACHE_MS;
      expect(msFromEnv('PUBLIC_LINK_CACHE_MS', 1000)).to.equal(1000);
      process.env.PUBLIC_LINK_CACHE_MS = '0';
      expect(msFromEnv('PUBLIC_LINK_CACHE_MS', 1000)).to.equal(0);
      process.env.PUBLIC_LINK_CACHE_MS = '250';
      expect(msFromEnv('PUBLIC_LINK_CACHE_MS', 1000)).to.equal(250);
      process.env.PUBLIC_LINK_CACHE_MS = '  ';
      expect(msFromEnv('PUBLIC_LINK_CACHE_MS', 1000)).to.equal(1000);
      for (const bad of ['soon', '-1', 'Infinity']) {
        process.env.PUBLIC_LINK_CACHE_MS = bad;
        expect(() => msFromEnv('PUBLIC_LINK_CACHE_MS', 1000), bad).to.throw(/PUBLIC_LINK_CACHE_MS must be a number of milliseconds/);
      }
    } finally {
      if (saved === undefined) delete process.env.PUBLIC_LINK_CACHE_MS;
      else process.env.PUBLIC_LINK_CACHE_MS = saved;
    }
  });
});
