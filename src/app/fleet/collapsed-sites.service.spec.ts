import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { AuthService } from '../core/auth.service';
import { CollapsedSites } from './collapsed-sites.service';

describe('CollapsedSites', () => {
  let http: HttpTestingController;

  const signInAs = async (id: number) => {
    const auth = TestBed.inject(AuthService);
    const done = auth.restore();
    http.expectOne('/api/auth/me').flush({ id, email: `user${id}@example.test`, name: `User ${id}`, role: 'operator' });
    await done;
  };

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
  });

  it('keeps each user their own collapsed sites in this browser', async () => {
    await signInAs(7);
    const sites = TestBed.inject(CollapsedSites);
    sites.toggle(3);
    sites.collapseAll([4, 5]);
    sites.toggle(5);
    expect([...sites.ids()]).toEqual([3, 4]);
    expect(JSON.parse(localStorage.getItem('jw.fleet.collapsed.7')!)).toEqual([3, 4]);

    // another user on the same browser starts with everything open, and the first user's set comes back for them
    await signInAs(8);
    expect(sites.ids().size).toBe(0);
    sites.toggle(9);
    await signInAs(7);
    expect([...sites.ids()]).toEqual([3, 4]);
    sites.expandAll();
    expect(localStorage.getItem('jw.fleet.collapsed.7')).toBe('[]');
    expect(localStorage.getItem('jw.fleet.collapsed.8')).toBe('[9]');
  });

  it('ignores a damaged stored value', async () => {
    localStorage.setItem('jw.fleet.collapsed.7', '{not json');
    await signInAs(7);
    expect(TestBed.inject(CollapsedSites).ids().size).toBe(0);
    localStorage.setItem('jw.fleet.collapsed.8', '[1,"x",2.5,4]');
    await signInAs(8);
    expect([...TestBed.inject(CollapsedSites).ids()]).toEqual([1, 4]);
  });
});
