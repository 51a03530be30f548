import { describe, expect, it } from 'vitest';
import { safeNext } from './session';

// Common practice (OWASP Cheat Sheet "Unvalidated Redirects and Forwards"): after sign-in follow
// only local paths; "//host" and "/\host" are treated by browsers as links to another host.
describe('safeNext', () => {
  it('keeps in-app paths', () => {
    expect(safeNext('/studies/1/team')).toBe('/studies/1/team');
    expect(safeNext(['/account'])).toBe('/account');
  });
  it('falls back to the studies list for anything that could leave the site or loop', () => {
    for (const bad of ['https://elsewhere.example/', '//elsewhere.example', '/\\elsewhere.example', 'studies', '', undefined, null, 42, '/sign-in?next=/x']) {
      expect(safeNext(bad)).toBe('/');
    }
  });
});
