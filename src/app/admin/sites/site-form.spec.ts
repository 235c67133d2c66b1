import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { Owner, Site } from '../../../../shared/contracts/api';
import { SiteForm, SiteFormData } from './site-form';

const OWNERS: Owner[] = [
  { id: 4, name: 'Quillmoor Energy Cooperative', contactEmail: null, siteCount: 2 },
  { id: 5, name: 'Fenwick Lane Schools Trust', contactEmail: null, siteCount: 2 },
];

describe('SiteForm', () => {
  let http: HttpTestingController;
  let close: ReturnType<typeof vi.fn>;
  let element: HTMLElement;
  let fixture: ReturnType<typeof TestBed.createComponent<SiteForm>>;

  beforeEach(async () => {
    close = vi.fn();
    const data: SiteFormData = { site: null, owners: OWNERS };
    TestBed.configureTestingModule({
      imports: [SiteForm],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MAT_DIALOG_DATA, useValue: data },
        { provide: MatDialogRef, useValue: { close } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SiteForm);
    element = fixture.nativeElement;
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  const loader = () => TestbedHarnessEnvironment.loader(fixture);
  const input = (name: string) => loader().getHarness(MatInputHarness.with({ selector: `[data-testid="${name}"]` }));
  const errors = () => [...element.querySelectorAll('mat-error')].map((e) => e.textContent!.trim()).filter(Boolean);

  async function fill(values: Record<string, string>): Promise<void> {
    for (const [name, value] of Object.entries(values)) {
      const field = await input(name);
      await field.setValue(value);
      await field.blur();
    }
  }

  async function submit(): Promise<void> {
    element.querySelector('form')!.dispatchEvent(new Event('submit'));
    await fixture.whenStable();
  }

  async function fillValidSite(): Promise<void> {
    await fill({
      name: 'Riverside Depot',
      latitudeDeg: '53.55',
      longitudeDeg: '9.99',
      elevationM: '12',
      albedo: '0.25',
      timeZone: 'Europe/Berlin',
    });
    const owner = await loader().getHarness(MatSelectHarness.with({ selector: '[data-testid="ownerId"]' }));
    await owner.open();
    await owner.clickOptions({ text: 'Quillmoor Energy Cooperative' });
  }

  it('names every missing required field and sends nothing', async () => {
    await fill({ elevationM: '', albedo: '' });
    await submit();
    expect(errors()).toEqual([
      'Site name is required.',
      'Owner is required.',
      'Latitude is required.',
      'Longitude is required.',
      'Elevation is required.',
      'Albedo is required.',
      'Time zone is required.',
    ]);
    http.expectNone('/api/sites');
    expect(close).not.toHaveBeenCalled();
  });

  it('states the allowed range of each out-of-range number', async () => {
    await fillValidSite();
    await fill({ latitudeDeg: '91', longitudeDeg: '-180.5', elevationM: '9001', albedo: '1.2' });
    expect(errors()).toEqual([
      'Latitude must be from −90 to 90°.',
      'Longitude must be from −180 to 180°.',
      'Elevation must be from −500 to 9000 m.',
      'Albedo must be from 0 to 1.',
    ]);
    await submit();
    http.expectNone('/api/sites');
  });

  it('accepts only IANA time zones', async () => {
    await fillValidSite();
    await fill({ timeZone: 'Mars/Olympus' });
    expect(errors()).toEqual(['Choose a time zone from the list.']);
  });

  it('posts a valid site and closes with the saved one', async () => {
    await fillValidSite();
    await submit();
    const request = http.expectOne('/api/sites');
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({
      name: 'Riverside Depot',
      ownerId: 4,
      latitudeDeg: 53.55,
      longitudeDeg: 9.99,
      elevationM: 12,
      timeZone: 'Europe/Berlin',
      albedo: 0.25,
      indoor: false,
    });
    const saved: Site = { ...request.request.body, id: 9, ownerName: 'Quillmoor Energy Cooperative', unitCount: 0 };
    request.flush(saved, { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(close).toHaveBeenCalledWith(saved);
  });

  it('puts the server’s field messages under the matching fields', async () => {
    await fillValidSite();
    await submit();
    http.expectOne('/api/sites').flush(
      {
        error: {
          code: 'validation_failed',
          message: 'The request has invalid fields.',
          fields: { name: 'A site with this name already exists.', timeZone: 'Unknown time zone.' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(errors()).toEqual(['A site with this name already exists.', 'Unknown time zone.']);
    expect(element.querySelector('[data-testid="form-problem"]')!.textContent).toContain('Some fields need attention');
    expect(close).not.toHaveBeenCalled();

    // Editing the field clears the server's verdict on it.
    await fill({ name: 'Riverside Depot North' });
    expect(errors()).toEqual(['Unknown time zone.']);
  });

  it('shows the server’s message when the failure is not about one field', async () => {
    await fillValidSite();
    await submit();
    http
      .expectOne('/api/sites')
      .flush({ error: { code: 'internal', message: 'The database is not answering.' } }, { status: 503, statusText: 'Unavailable' });
    await fixture.whenStable();
    expect(element.querySelector('[data-testid="form-problem"]')!.textContent).toContain('The database is not answering.');
    expect(errors()).toEqual([]);
  });
});
