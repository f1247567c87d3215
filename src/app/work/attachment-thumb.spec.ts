import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { AttachmentThumb } from './attachment-thumb';
import { WorkAttachment } from './work-types';

const file = (id: number, contentType = 'image/jpeg'): WorkAttachment => ({
  id,
  stepId: null,
  originalName: `photo-${id}.jpg`,
  contentType,
  size: 3,
  uploadedByName: null,
  createdAt: '2026-12-02T01:10:00.000Z',
  url: `/api/attachments/${id}`,
});

describe('AttachmentThumb', () => {
  let created: string[];
  let revoked: string[];

  beforeEach(() => {
    created = [];
    revoked = [];
    vi.spyOn(URL, 'createObjectURL').mockImplementation(() => {
      created.push(`blob:test/${created.length + 1}`);
      return created[created.length - 1];
    });
    vi.spyOn(URL, 'revokeObjectURL').mockImplementation((u: string) => void revoked.push(u));
    TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
  });
  afterEach(() => vi.restoreAllMocks());

  it('shows the fetched file through an object URL, frees it for the next file and when it goes', async () => {
    const fixture = TestBed.createComponent(AttachmentThumb);
    const http = TestBed.inject(HttpTestingController);
    fixture.componentRef.setInput('file', file(1));
    fixture.detectChanges();
    expect(fixture.nativeElement.querySelector('img')).toBeNull(); // the placeholder until the file is here
    http.expectOne('/api/attachments/1').flush(new Blob(['abc']));
    await fixture.whenStable();
    expect(fixture.nativeElement.querySelector('img').getAttribute('src')).toBe('blob:test/1');

    fixture.componentRef.setInput('file', file(2));
    fixture.detectChanges();
    http.expectOne('/api/attachments/2').flush(new Blob(['def']));
    await fixture.whenStable();
    expect(fixture.nativeElement.querySelector('img').getAttribute('src')).toBe('blob:test/2');
    expect(revoked).toEqual(['blob:test/1']);

    fixture.destroy();
    expect(revoked).toEqual(['blob:test/1', 'blob:test/2']);
  });

  it('keeps the placeholder with the name when the file cannot be fetched', async () => {
    const fixture = TestBed.createComponent(AttachmentThumb);
    const http = TestBed.inject(HttpTestingController);
    fixture.componentRef.setInput('file', file(3));
    fixture.detectChanges();
    http.expectOne('/api/attachments/3').flush(new Blob(['gone']), { status: 404, statusText: 'Not Found' });
    await fixture.whenStable();
    expect(fixture.nativeElement.querySelector('img')).toBeNull();
    expect(fixture.nativeElement.textContent).toContain('photo-3.jpg');
    expect(created).toEqual([]);
  });
});
