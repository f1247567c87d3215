import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { UserMenu } from './user-menu';

describe('UserMenu', () => {
  let fixture: ComponentFixture<UserMenu>;
  let host: HTMLElement;
  let signOuts: number;

  const trigger = () => host.querySelector<HTMLButtonElement>('button.user-button')!;
  const panel = () => host.querySelector<HTMLElement>('.panel');

  beforeEach(() => {
    TestBed.configureTestingModule({ imports: [UserMenu], providers: [provideRouter([])] });
    fixture = TestBed.createComponent(UserMenu);
    fixture.componentRef.setInput('name', 'Test Planner');
    fixture.componentRef.setInput('email', 'planner@example.test');
    fixture.componentRef.setInput('roleText', 'Planner');
    signOuts = 0;
    fixture.componentInstance.signOut.subscribe(() => signOuts++);
    fixture.detectChanges();
    host = fixture.nativeElement as HTMLElement;
    document.body.appendChild(host);
  });

  afterEach(() => host.remove());

  it('is a disclosure: the button says whether its panel is open and which element it controls', () => {
    expect(trigger().textContent).toContain('Test Planner');
    expect(trigger().getAttribute('aria-expanded')).toBe('false');
    expect(panel()).toBeNull();

    trigger().click();
    fixture.detectChanges();
    expect(trigger().getAttribute('aria-expanded')).toBe('true');
    expect(panel()!.id).toBe(trigger().getAttribute('aria-controls'));
    expect(panel()!.textContent).toContain('planner@example.test · Planner');
    expect(host.querySelector('a.item')!.getAttribute('href')).toBe('/settings');
  });

  it('closes on Escape and gives the focus back to its button', () => {
    trigger().click();
    fixture.detectChanges();
    host.querySelector<HTMLElement>('a.item')!.focus();
    host.querySelector('a.item')!.dispatchEvent(new KeyboardEvent('keydown', { key: 'Escape', bubbles: true }));
    fixture.detectChanges();
    expect(panel()).toBeNull();
    expect(document.activeElement).toBe(trigger());
  });

  it('closes on a click elsewhere on the page, not on a click inside it', () => {
    trigger().click();
    fixture.detectChanges();
    panel()!.click();
    fixture.detectChanges();
    expect(panel()).not.toBeNull();
    document.body.click();
    fixture.detectChanges();
    expect(panel()).toBeNull();
  });

  it('signs out from its entry and closes', () => {
    trigger().click();
    fixture.detectChanges();
    const signOut = Array.from(host.querySelectorAll<HTMLButtonElement>('button.item')).find((b) => b.textContent?.includes('Sign out'))!;
    signOut.click();
    fixture.detectChanges();
    expect(signOuts).toBe(1);
    expect(panel()).toBeNull();
  });
});
