import { formatDate } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, LOCALE_ID, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { RECORD_STATUS_LABELS } from '@setwright/contracts/records';
import type { TrendPoint, TrendSeries } from '@setwright/contracts/trends';
import { scaleLinear, scaleTime } from 'd3-scale';
import { line } from 'd3-shape';

/** The drawing's own coordinates; the SVG scales to its box. */
const W = 640;
const H = 240;
const M = { top: 16, right: 20, bottom: 34, left: 60 };
const DAY = 86_400_000;

let nextId = 0;

/** How a reading is written: an entered figure as it was entered, a computed one to the procedure's decimals. */
export function formatReading(series: Pick<TrendSeries, 'kind' | 'decimals'>, value: number): string {
  return series.kind === 'computed' ? value.toFixed(series.decimals) : String(Number(value.toPrecision(6)));
}

/**
 * One reading over time as an SVG chart (d3-scale for the axes, d3-shape for the line): the band
 * within the limits in force, the limits as dashed lines, out-of-limits readings drawn as red
 * diamonds (circles otherwise), and the same readings as a table behind a button.
 */
@Component({
  selector: 'sw-trend-chart',
  imports: [MatButtonModule, MatIconModule, RouterLink],
  templateUrl: './trend-chart.html',
  styleUrl: './trend-chart.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TrendChart {
  private readonly locale = inject(LOCALE_ID);
  readonly series = input.required<TrendSeries>();
  /** Competent persons, auditors and admins may open the records behind the readings. */
  readonly linkRecords = input(false);

  protected readonly id = `trend-${++nextId}`;
  protected readonly view = `0 0 ${W} ${H}`;
  protected readonly plot = { left: M.left, right: W - M.right, top: M.top, bottom: H - M.bottom };
  protected readonly showTable = signal(false);
  protected readonly statusLabels = RECORD_STATUS_LABELS;

  private readonly x = computed(() => {
    const times = this.series().points.map((p) => Date.parse(p.at));
    const lo = Math.min(...times);
    const hi = Math.max(...times);
    const pad = hi - lo < DAY ? DAY : (hi - lo) * 0.03;
    return scaleTime().domain([lo - pad, hi + pad]).range([this.plot.left, this.plot.right]);
  });

  private readonly y = computed(() => {
    const s = this.series();
    const values = s.points.map((p) => p.value);
    if (s.limits?.min !== null && s.limits?.min !== undefined) values.push(s.limits.min);
    if (s.limits?.max !== null && s.limits?.max !== undefined) values.push(s.limits.max);
    let lo = Math.min(...values);
    let hi = Math.max(...values);
    const span = hi - lo || Math.abs(hi) * 0.1 || 1;
    lo -= span * 0.15;
    hi += span * 0.15;
    return scaleLinear().domain([lo, hi]).range([this.plot.bottom, this.plot.top]).nice(5);
  });

  protected readonly yTicks = computed(() => {
    const y = this.y();
    const format = y.tickFormat(5);
    return y.ticks(5).map((v) => ({ v, at: y(v), label: format(v) }));
  });

  protected readonly xTicks = computed(() => {
    const x = this.x();
    return x.ticks(4).map((d) => ({ at: x(d), label: formatDate(d, 'MMM y', this.locale) }));
  });

  /** The band within the limits (to the edge of the plot where only one limit is set). */
  protected readonly band = computed(() => {
    const l = this.series().limits;
    if (!l) return null;
    const y = this.y();
    const top = l.max !== null ? y(l.max) : this.plot.top;
    const bottom = l.min !== null ? y(l.min) : this.plot.bottom;
    return { y: Math.max(this.plot.top, top), height: Math.max(0, Math.min(this.plot.bottom, bottom) - Math.max(this.plot.top, top)) };
  });

  protected readonly limitLines = computed(() => {
    const s = this.series();
    const l = s.limits;
    if (!l) return [];
    const unit = l.unit ?? s.unit ?? '';
    const out: { at: number; label: string }[] = [];
    if (l.max !== null) out.push({ at: this.y()(l.max), label: `max ${formatReading({ kind: 'input', decimals: 0 }, l.max)} ${unit}` });
    if (l.min !== null) out.push({ at: this.y()(l.min), label: `min ${formatReading({ kind: 'input', decimals: 0 }, l.min)} ${unit}` });
    return out;
  });

  protected readonly points = computed(() => {
    const s = this.series();
    const x = this.x();
    const y = this.y();
    return s.points.map((p) => ({
      ...p,
      cx: x(Date.parse(p.at)),
      cy: y(p.value),
      text: formatReading(s, p.value),
      date: formatDate(p.at, 'd MMM y', this.locale),
    }));
  });

  protected readonly path = computed(() => {
    const x = this.x();
    const y = this.y();
    return line<TrendPoint>()
      .x((p) => x(Date.parse(p.at)))
      .y((p) => y(p.value))(this.series().points) ?? '';
  });

  protected readonly unit = computed(() => this.series().unit ?? '');

  /** What the chart shows, in words, for a screen reader. */
  protected readonly summary = computed(() => {
    const s = this.series();
    const pts = this.points();
    const first = pts[0]!;
    const last = pts[pts.length - 1]!;
    const unit = this.unit() ? ` ${this.unit()}` : '';
    const l = s.limits;
    const limits = !l
      ? 'no limits set'
      : l.min !== null && l.max !== null
        ? `limits ${l.min} to ${l.max}${unit}`
        : l.max !== null
          ? `at most ${l.max}${unit}`
          : `at least ${l.min}${unit}`;
    const out = pts.filter((p) => p.outOfLimits).length;
    return (
      `${s.label}, ${s.procedureTitle}: ${pts.length} reading${pts.length === 1 ? '' : 's'} from ${first.date} to ${last.date}; ${limits}; ` +
      `${out} out of limits; latest ${last.text}${unit} on ${last.date}.`
    );
  });

  protected readonly diamond = (cx: number, cy: number) => `M${cx} ${cy - 8}L${cx + 8} ${cy}L${cx} ${cy + 8}L${cx - 8} ${cy}Z`;
}
