import { provideHttpClient } from '@angular/common/http';
import { provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { NotAllowedPage, forRolesText } from './not-allowed-page';
import { NotFoundPage } from './not-found-page';

describe('not-allowed and not-found pages', () => {
  beforeEach(() => {
    TestBed.configureTestingModule({ providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
  });

  it('names the roles a page is for', () => {
    expect(forRolesText(['admin'])).toBe('This page is for administrators');
    expect(forRolesText(['planner', 'admin'])).toBe('This page is for planners and administrators');
    expect(forRolesText([])).toBe('This page is not open to your role');
  });

  it('says who the page is for and offers the way home', () => {
    const fixture = TestBed.createComponent(NotAllowedPage);
    fixture.componentRef.setInput('roles', 'admin');
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('h1')!.textContent).toBe('This page is for administrators');
    expect(el.querySelector('a')!.getAttribute('href')).toBe('/fleet');
  });

  it('a not-found page offers the way home', () => {
    const fixture = TestBed.createComponent(NotFoundPage);
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('h1')!.textContent).toBe('There is no page at this address');
    expect(el.querySelector('a')!.getAttribute('href')).toBe('/fleet');
  });
});
