// Client rules that must agree with the server's: role names and order (shared/api/teams.ts), the
// password minimum (shared/api/auth.ts, contracts.md: "password ≥ 10 chars"), and the wording of
// field messages.
import { expect } from 'chai';
import { passwordMinLength } from '@shared/api/auth';
import { teamRoles } from '@shared/api/teams';
import { PASSWORD_MIN_LENGTH, validationMessage } from '../../client/src/app/core/field-messages';
import { firstNameOf, initialsOf } from '../../client/src/app/core/person-name';
import { ROLES, isRole, ownerCount, roleAtLeast, roleLabel, sortByRole } from '../../client/src/app/core/roles';

describe('client: roles', () => {
  it('lists the same roles in the same order as the server', () => {
    expect([...ROLES]).to.deep.equal([...teamRoles]);
  });

  it('orders rights owner > editor > reviewer > viewer (contracts.md)', () => {
    expect(roleAtLeast('owner', 'owner')).to.equal(true);
    expect(roleAtLeast('owner', 'viewer')).to.equal(true);
    expect(roleAtLeast('editor', 'owner')).to.equal(false);
    expect(roleAtLeast('editor', 'reviewer')).to.equal(true);
    expect(roleAtLeast('reviewer', 'editor')).to.equal(false);
    expect(roleAtLeast('viewer', 'reviewer')).to.equal(false);
    expect(roleAtLeast(null, 'viewer')).to.equal(false);
    expect(roleAtLeast('admin', 'viewer')).to.equal(false);
  });

  it('labels roles and recognises only real ones', () => {
    expect(roleLabel('reviewer')).to.equal('Reviewer');
    expect(roleLabel('unknown')).to.equal('unknown');
    expect(isRole('viewer')).to.equal(true);
    expect(isRole('Owner')).to.equal(false);
  });

  it('sorts members owners first, then by role, then by name, without changing the input', () => {
    const members = [
      { name: 'Priya', role: 'reviewer' },
      { name: 'Tomas', role: 'editor' },
      { name: 'Zoe', role: 'owner' },
      { name: 'Ines', role: 'owner' },
      { name: 'Marc', role: 'viewer' },
    ];
    const copy = structuredClone(members);
    expect(sortByRole(members).map((m) => m.name)).to.deep.equal(['Ines', 'Zoe', 'Tomas', 'Priya', 'Marc']);
    expect(members).to.deep.equal(copy);
    expect(ownerCount(members)).to.equal(2);
  });
});

describe('client: field messages', () => {
  it('uses the server password minimum', () => {
    expect(PASSWORD_MIN_LENGTH).to.equal(passwordMinLength);
  });

  it('prefers the server message for a field over local ones', () => {
    expect(validationMessage({ server: 'Already in use.', required: true }, 'E-mail')).to.equal('Already in use.');
  });

  it('words the local validators', () => {
    expect(validationMessage(null, 'Name')).to.equal(null);
    expect(validationMessage({ required: true }, 'Name')).to.equal('Name is required.');
    expect(validationMessage({ email: true }, 'E-mail')).to.match(/e-mail address/);
    expect(validationMessage({ minlength: { requiredLength: 10, actualLength: 4 } }, 'Password')).to.equal(
      'Password must have at least 10 characters (4 so far).',
    );
    expect(validationMessage({ maxlength: { requiredLength: 120, actualLength: 130 } }, 'Team name')).to.equal(
      'Team name can have at most 120 characters.',
    );
    expect(validationMessage({ blank: true }, 'Name')).to.equal('Name cannot be only spaces.');
    expect(validationMessage({ pattern: {} }, 'Code')).to.equal('Code is not valid.');
  });
});

describe('client: person names', () => {
  it('makes initials from the first and last word', () => {
    expect(initialsOf('Ines Okafor')).to.equal('IO');
    expect(initialsOf('  marc  de la unay ')).to.equal('MU');
    expect(initialsOf('Priya')).to.equal('P');
    expect(initialsOf('')).to.equal('');
    expect(initialsOf('Åsa Öberg')).to.equal('ÅÖ');
  });

  it('takes the first word for greetings', () => {
    expect(firstNameOf(' Tomas Lindqvist')).to.equal('Tomas');
    expect(firstNameOf('')).to.equal('');
  });
});
