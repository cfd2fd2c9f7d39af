import { useState, type ReactNode } from 'react';
import { View, type LayoutChangeEvent } from 'react-native';
import Svg, { Circle, G, Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import { scaleBand, scaleLinear, scaleUtc } from 'd3-scale';
import { line } from 'd3-shape';
import { color, font } from '../theme';

/**
 * Charts drawn with react-native-svg from d3 scales and shapes: scales place the marks and make
 * the axis ticks, `line` draws the series. Each chart is an image with a summary label; the table
 * beside it carries the numbers for screen readers and for copying.
 */

const margin = { top: 12, right: 24, bottom: 28, left: 44 };
const axisText = { fontSize: 11, fontFamily: font.regular, fill: color.inkMuted };

/** Measures the width it is given, so the chart fills its column at 390 px and at 1440 px. */
function Sized({ height, label, testID, children }: { height: number; label: string; testID: string; children: (width: number) => ReactNode }) {
  const [width, setWidth] = useState(0);
  const onLayout = (e: LayoutChangeEvent) => setWidth(Math.floor(e.nativeEvent.layout.width));
  return (
    <View onLayout={onLayout} style={{ width: '100%', height }} role="img" aria-label={label} testID={testID}>
      {width > 0 ? children(width) : null}
    </View>
  );
}

/** A value axis from zero to at least `max` (at least 1), bottom to top of the plot. */
const countScale = (max: number, height: number) =>
  scaleLinear()
    .domain([0, Math.max(1, max)])
    .nice()
    .range([height - margin.bottom, margin.top]);

/** Label every how-many-th of `count` columns so that labels stand about `spacing` px apart. */
const labelStep = (count: number, width: number, spacing: number) => Math.max(1, Math.ceil(count / Math.max(2, Math.floor(width / spacing))));

/** The value axis: a rule across the plot and a label at each tick. */
function ValueRules({ y, ticks, width, format }: { y: (value: number) => number; ticks: number[]; width: number; format: (tick: number) => string }) {
  return (
    <>
      {ticks.map((t) => (
        <G key={`y${t}`}>
          <Line x1={margin.left} x2={width - margin.right} y1={y(t)} y2={y(t)} stroke={color.line} strokeWidth={1} />
          <SvgText x={margin.left - 6} y={y(t) + 4} textAnchor="end" {...axisText}>
            {format(t)}
          </SvgText>
        </G>
      ))}
    </>
  );
}

export interface TrendPoint {
  /** Monday of the week (YYYY-MM-DD). */
  weekStart: string;
  median: number | null;
  p90: number | null;
}

/** Median and 90th percentile per week (hours), with the target as a dashed rule. */
export function TrendChart({ points, targetHours, label, testID }: { points: TrendPoint[]; targetHours?: number; label: string; testID: string }) {
  const height = 220;
  return (
    <Sized height={height} label={label} testID={testID}>
      {(width) => {
        const dates = points.map((p) => new Date(`${p.weekStart}T00:00:00Z`));
        const first = dates[0] ?? new Date();
        const last = dates[dates.length - 1] ?? first;
        const x = scaleUtc()
          .domain(first.getTime() === last.getTime() ? [new Date(first.getTime() - 3.5 * 864e5), new Date(last.getTime() + 3.5 * 864e5)] : [first, last])
          .range([margin.left, width - margin.right]);
        const values = points.flatMap((p) => [p.median, p.p90]).filter((v): v is number => v !== null);
        const y = scaleLinear()
          .domain([Math.min(0, ...values), Math.max(1, targetHours ?? 0, ...values)])
          .nice()
          .range([height - margin.bottom, margin.top]);
        const series = (key: 'median' | 'p90') =>
          line<TrendPoint>()
            .defined((p) => p[key] !== null)
            .x((p) => x(new Date(`${p.weekStart}T00:00:00Z`)))
            .y((p) => y(p[key] as number))(points) ?? '';
        const xTicks = x.ticks(Math.max(2, Math.floor(width / 110)));
        const xFormat = x.tickFormat(xTicks.length, '%d %b');
        return (
          <Svg width={width} height={height}>
            <ValueRules y={y} ticks={y.ticks(4)} width={width} format={(t) => `${t} h`} />
            {xTicks.map((t) => (
              <SvgText key={`x${t.getTime()}`} x={x(t)} y={height - 8} textAnchor="middle" {...axisText}>
                {xFormat(t)}
              </SvgText>
            ))}
            {targetHours !== undefined ? (
              <Line x1={margin.left} x2={width - margin.right} y1={y(targetHours)} y2={y(targetHours)} stroke={color.abnormal} strokeDasharray="4 4" strokeWidth={1} />
            ) : null}
            <Path d={series('p90')} stroke={color.accent} strokeWidth={2} fill="none" />
            <Path d={series('median')} stroke={color.brand} strokeWidth={2.5} fill="none" />
            {points.map((p) => (
              <G key={p.weekStart}>
                {p.p90 !== null ? <Circle cx={x(new Date(`${p.weekStart}T00:00:00Z`))} cy={y(p.p90)} r={2.5} fill={color.accent} /> : null}
                {p.median !== null ? <Circle cx={x(new Date(`${p.weekStart}T00:00:00Z`))} cy={y(p.median)} r={3} fill={color.brand} /> : null}
              </G>
            ))}
          </Svg>
        );
      }}
    </Sized>
  );
}

export interface Bar {
  key: string;
  label: string;
  value: number;
  highlight?: boolean;
}

/** Vertical bars on a band scale (the drift distribution). */
export function BarChart({ bars, label, testID }: { bars: Bar[]; label: string; testID: string }) {
  const height = 200;
  return (
    <Sized height={height} label={label} testID={testID}>
      {(width) => {
        const x = scaleBand<string>().domain(bars.map((b) => b.key)).range([margin.left, width - margin.right]).padding(0.15);
        const y = countScale(Math.max(...bars.map((b) => b.value)), height);
        const every = labelStep(bars.length, width, 70);
        return (
          <Svg width={width} height={height}>
            <ValueRules y={y} ticks={y.ticks(4).filter(Number.isInteger)} width={width} format={String} />
            {bars.map((b, i) => (
              <G key={b.key}>
                <Rect x={x(b.key)} y={y(b.value)} width={x.bandwidth()} height={y(0) - y(b.value)} fill={b.highlight ? color.normal : color.borderline} rx={2} />
                {i % every === 0 ? (
                  <SvgText x={(x(b.key) ?? 0) + x.bandwidth() / 2} y={height - 8} textAnchor="middle" {...axisText}>
                    {b.label}
                  </SvgText>
                ) : null}
              </G>
            ))}
          </Svg>
        );
      }}
    </Sized>
  );
}

export interface StackedColumn {
  key: string;
  label: string;
  parts: { key: string; value: number }[];
}

/** Columns stacked by category (the endotype mix per month), each category in its own colour. */
export function StackedBars({ columns, palette, label, testID }: { columns: StackedColumn[]; palette: Record<string, string>; label: string; testID: string }) {
  const height = 220;
  return (
    <Sized height={height} label={label} testID={testID}>
      {(width) => {
        const x = scaleBand<string>().domain(columns.map((c) => c.key)).range([margin.left, width - margin.right]).padding(0.2);
        const totals = columns.map((c) => c.parts.reduce((a, p) => a + p.value, 0));
        const y = countScale(Math.max(...totals), height);
        const every = labelStep(columns.length, width, 60);
        return (
          <Svg width={width} height={height}>
            <ValueRules y={y} ticks={y.ticks(4).filter(Number.isInteger)} width={width} format={String} />
            {columns.map((c, i) => {
              let base = 0;
              return (
                <G key={c.key}>
                  {c.parts.map((p) => {
                    const top = base + p.value;
                    const rect = <Rect key={p.key} x={x(c.key)} y={y(top)} width={x.bandwidth()} height={y(base) - y(top)} fill={palette[p.key] ?? color.inkFaint} />;
                    base = top;
                    return rect;
                  })}
                  {i % every === 0 ? (
                    <SvgText x={(x(c.key) ?? 0) + x.bandwidth() / 2} y={height - 8} textAnchor="middle" {...axisText}>
                      {c.label}
                    </SvgText>
                  ) : null}
                </G>
              );
            })}
          </Svg>
        );
      }}
    </Sized>
  );
}
