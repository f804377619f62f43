import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import type { TrendSeries } from '@setwright/contracts/trends';
import { TrendChart } from './trend-chart';

const SERIES: TrendSeries = {
  key: 'guide-bearings/back-rollers/fixed-guide',
  procedureKey: 'guide-bearings',
  procedureTitle: 'Setting the guide bearings',
  stepId: 'back-rollers',
  stepTitle: 'Back rollers',
  valueId: 'fixed-guide',
  label: 'Fixed guide clearance',
  unit: 'mm',
  kind: 'input',
  decimals: 2,
  limits: { min: 0.08, max: 0.12, unit: 'mm' },
  points: [
    { recordId: 'r1', at: '2026-06-01T10:00:00.000Z', value: 0.09, unit: 'mm', outOfLimits: false, recordStatus: 'signed_off' },
    { recordId: 'r2', at: '2026-08-01T10:00:00.000Z', value: 0.13, unit: 'mm', outOfLimits: true, recordStatus: 'signed_off' },
    { recordId: 'r3', at: '2026-10-01T10:00:00.000Z', value: 0.11, unit: 'mm', outOfLimits: false, recordStatus: 'ready_for_signoff' },
  ],
  drift: { toward: 'max', limit: 0.12, slopePerCheck: 0.01, projected: 0.14, checksToLimit: 2 },
};

describe('TrendChart', () => {
  async function render(series: TrendSeries) {
    TestBed.configureTestingModule({ imports: [TrendChart], providers: [provideZonelessChangeDetection(), provideRouter([])] });
    const fixture = TestBed.createComponent(TrendChart);
    fixture.componentRef.setInput('series', series);
    await fixture.whenStable();
    return { fixture, el: fixture.nativeElement as HTMLElement, loader: TestbedHarnessEnvironment.loader(fixture) };
  }

  it('when a reading went out of limits, then it is a diamond among circles, the chart is named in words, and the drift notice says when the limit is passed', async () => {
    const { el } = await render(SERIES);
    const marks = [...el.querySelectorAll('g.point')].map((g) => (g.querySelector('circle') ? 'circle' : 'diamond'));
    expect(marks).toEqual(['circle', 'diamond', 'circle']);
    const svg = el.querySelector('svg[role=img]')!;
    expect(svg.getAttribute('aria-label')).toContain('Fixed guide clearance, Setting the guide bearings: 3 readings');
    expect(svg.getAttribute('aria-label')).toContain('limits 0.08 to 0.12 mm; 1 out of limits; latest 0.11 mm');
    expect(el.querySelector('[role=note]')!.textContent!.replace(/\s+/g, ' ')).toContain('Drifting toward the maximum of 0.12 mm: at this rate it passes it within 2 more checks.');
    // Higher readings are drawn higher: the out-of-limits 0.13 mm sits above the others.
    const heights = [...el.querySelectorAll<SVGGElement>('g.point')].map((g) => Number(g.dataset['cy']));
    expect(heights[1]!).toBeLessThan(heights[2]!);
    expect(heights[2]!).toBeLessThan(heights[0]!);
  });

  it('when the table is asked for, then the same readings are listed with their verdicts and their records’ states, and the button says it is open', async () => {
    const { el, fixture, loader } = await render({ ...SERIES, drift: null });
    expect(el.querySelector('[role=note]')).toBeNull();
    const toggle = await loader.getHarness(MatButtonHarness.with({ text: /Show the readings as a table/ }));
    expect(el.querySelector('table')!.closest('[hidden]')).not.toBeNull();
    await toggle.click();
    await fixture.whenStable();
    expect(await (await toggle.host()).getAttribute('aria-expanded')).toBe('true');
    const rows = [...el.querySelectorAll('tbody tr')].map((r) => [...r.querySelectorAll('td')].slice(1).map((c) => c.textContent!.trim()));
    expect(rows).toEqual([
      ['0.09 mm', 'Within', 'Signed off'],
      ['0.13 mm', 'Out of limits', 'Signed off'],
      ['0.11 mm', 'Within', 'Ready for sign-off'],
    ]);
  });
});
