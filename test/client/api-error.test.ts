// Client handling of API failures. The reference is the agreed error shape in contracts.md:
// `{ error: { code, message, details? } }`, validation `details` being `[{ field, message }]`.
import { expect } from 'chai';
import { ApiError, apiErrorFromResponse, splitFieldErrors, toApiError } from '../../client/src/app/core/api-error';

describe('client: API errors', () => {
  it('reads code, message and field details from the agreed error body', () => {
    const body = {
      error: {
        code: 'validation',
        message: 'Check these fields: password.',
        details: [{ field: 'password', message: 'A password has at least 10 characters.' }],
      },
    };
    const error = apiErrorFromResponse(400, body);
    expect(error).to.be.instanceOf(ApiError);
    expect(error.status).to.equal(400);
    expect(error.code).to.equal('validation');
    expect(error.message).to.equal('Check these fields: password.');
    expect(error.fieldErrors).to.deep.equal([{ field: 'password', message: 'A password has at least 10 characters.' }]);
    expect(error.fieldMessage('password')).to.equal('A password has at least 10 characters.');
    expect(error.fieldMessage('email')).to.equal(undefined);
  });

  it('parses a body that arrived as a JSON string', () => {
    const error = apiErrorFromResponse(409, JSON.stringify({ error: { code: 'last_owner', message: 'Keep one owner.' } }));
    expect(error.code).to.equal('last_owner');
    expect(error.message).to.equal('Keep one owner.');
    expect(error.fieldErrors).to.deep.equal([]);
  });

  it('keeps details that are not field errors as raw details, without inventing field errors', () => {
    const error = apiErrorFromResponse(409, { error: { code: 'head_moved', message: 'Moved.', details: { head: 'r7' } } });
    expect(error.fieldErrors).to.deep.equal([]);
    expect(error.details).to.deep.equal({ head: 'r7' });
  });

  it('drops malformed detail entries and keeps the well-formed ones', () => {
    const error = apiErrorFromResponse(400, {
      error: { code: 'validation', message: 'x', details: [{ field: 'name' }, null, { field: 'email', message: 'Bad.' }, 'text'] },
    });
    expect(error.fieldErrors).to.deep.equal([{ field: 'email', message: 'Bad.' }]);
  });

  it('gives a network error for status 0 and a status-based message for bodies without the shape', () => {
    expect(apiErrorFromResponse(0, null).code).to.equal('network');
    const proxyPage = apiErrorFromResponse(502, '<html>Bad gateway</html>');
    expect(proxyPage.code).to.equal('unexpected');
    expect(proxyPage.status).to.equal(502);
    expect(proxyPage.message).to.match(/server had a problem/);
    expect(apiErrorFromResponse(429, undefined).message).to.match(/Too many attempts/);
  });

  it('falls back to a status message when the server message is empty', () => {
    expect(apiErrorFromResponse(403, { error: { code: 'forbidden', message: '  ' } }).message).to.equal(
      'You do not have permission to do that.',
    );
  });

  it('normalises anything thrown: ApiError as is, HttpErrorResponse-like objects, plain errors', () => {
    const original = new ApiError(404, 'not_found', 'Gone.');
    expect(toApiError(original)).to.equal(original);
    const httpLike = { status: 401, error: { error: { code: 'bad_credentials', message: 'No.' } }, message: 'Http failure' };
    expect(toApiError(httpLike).code).to.equal('bad_credentials');
    const plain = toApiError(new Error('Signed in, but the session was not kept.'));
    expect(plain.code).to.equal('unexpected');
    expect(plain.message).to.equal('Signed in, but the session was not kept.');
    expect(toApiError('weird').message).to.equal('Something went wrong.');
  });

  describe('splitFieldErrors', () => {
    const validation = (details: { field: string; message: string }[]) =>
      apiErrorFromResponse(400, { error: { code: 'validation', message: 'Check these fields.', details } });

    it('puts messages on known fields and needs no form-level message then', () => {
      const { byField, formMessage } = splitFieldErrors(
        validation([
          { field: 'email', message: 'Enter a valid e-mail address.' },
          { field: 'password', message: 'Too short.' },
        ]),
        ['name', 'email', 'password'],
      );
      expect(byField).to.deep.equal({ email: 'Enter a valid e-mail address.', password: 'Too short.' });
      expect(formMessage).to.equal(null);
    });

    it('keeps the first message of a field that has several', () => {
      const { byField } = splitFieldErrors(
        validation([
          { field: 'email', message: 'First.' },
          { field: 'email', message: 'Second.' },
        ]),
        ['email'],
      );
      expect(byField).to.deep.equal({ email: 'First.' });
    });

    it('reports fields the form does not have at form level, so no message is lost', () => {
      const { byField, formMessage } = splitFieldErrors(
        validation([
          { field: 'email', message: 'Bad.' },
          { field: '(body)', message: 'Expected an object.' },
        ]),
        ['email'],
      );
      expect(byField).to.deep.equal({ email: 'Bad.' });
      expect(formMessage).to.equal('Check these fields. (body): Expected an object.');
    });

    it('uses the error message at form level when there are no field errors', () => {
      const { byField, formMessage } = splitFieldErrors(new ApiError(429, 'rate_limited', 'Wait 15 minutes.'), ['email']);
      expect(byField).to.deep.equal({});
      expect(formMessage).to.equal('Wait 15 minutes.');
    });
  });
});
