// Which requests carry the CSRF token. Reference: contracts.md ("every state-changing request
// (POST/PUT/PATCH/DELETE under /api, signed in or not) carries header X-CSRF-Token").
import { expect } from 'chai';
import { CSRF_HEADER, apiPath, isAuthRequest, needsCsrfToken, safeReturnUrl } from '../../client/src/app/core/request-rules';

const origin = 'http://127.0.0.1:4300';

describe('client: request rules', () => {
  it('uses the header name of the contract', () => {
    expect(CSRF_HEADER).to.equal('X-CSRF-Token');
  });

  it('adds the token to every state-changing method under /api, and to no safe method', () => {
    for (const method of ['POST', 'PUT', 'PATCH', 'DELETE', 'post', 'delete']) {
      expect(needsCsrfToken(method, '/api/teams', origin), method).to.equal(true);
    }
    for (const method of ['GET', 'HEAD', 'OPTIONS', 'get']) {
      expect(needsCsrfToken(method, '/api/teams', origin), method).to.equal(false);
    }
  });

  it('never sends the token outside our API', () => {
    expect(needsCsrfToken('POST', '/apix', origin)).to.equal(false);
    expect(needsCsrfToken('POST', '/assets/api/x', origin)).to.equal(false);
    expect(needsCsrfToken('POST', 'https://elsewhere.test/api/teams', origin)).to.equal(false);
    expect(needsCsrfToken('POST', '//elsewhere.test/api/teams', origin)).to.equal(false);
    expect(needsCsrfToken('POST', 'http://127.0.0.1:4301/api/teams', origin)).to.equal(false);
    expect(needsCsrfToken('POST', `${origin}/api/teams`, origin)).to.equal(true);
    expect(needsCsrfToken('POST', `${origin}/api/teams`)).to.equal(false);
  });

  it('finds the API path with query strings and fragments removed', () => {
    expect(apiPath('/api/teams?x=1')).to.equal('/api/teams');
    expect(apiPath('/api')).to.equal('/api');
    expect(apiPath('/')).to.equal(null);
  });

  it('tells auth requests (whose 401 is an answer, not an ended session) from the others', () => {
    expect(isAuthRequest('/api/auth/signin', origin)).to.equal(true);
    expect(isAuthRequest('/api/auth/session', origin)).to.equal(true);
    expect(isAuthRequest('/api/authors', origin)).to.equal(false);
    expect(isAuthRequest('/api/teams', origin)).to.equal(false);
  });

  describe('safeReturnUrl', () => {
    it('keeps paths inside the app', () => {
      expect(safeReturnUrl('/teams/42')).to.equal('/teams/42');
      expect(safeReturnUrl('/teams/42?tab=members')).to.equal('/teams/42?tab=members');
      expect(safeReturnUrl('/sign-inside')).to.equal('/sign-inside');
    });

    it('refuses anything that could leave the app or loop back to sign-in', () => {
      for (const bad of [
        undefined,
        null,
        '',
        'https://elsewhere.test/',
        '//elsewhere.test/x',
        '/\\elsewhere.test',
        '/a\\b',
        'javascript:alert(1)',
        'teams/42',
        '/x\u0000y',
        '/sign-in',
        '/sign-in?returnUrl=/x',
        '/sign-up',
      ]) {
        expect(safeReturnUrl(bad), String(bad)).to.equal('/');
      }
    });
  });
});
