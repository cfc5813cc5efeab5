/** Chart options of the evaluation page, from a stored result (bits everywhere). */
import type { EChartsCoreOption } from 'echarts/core';
import type { SsmEvaluation } from '../../../../shared/eval/evaluation-report';
import { CHART_COLOURS as C, CHART_FONT, CHART_MONO } from '../../corpora/corpus-charts/chart-setup';

const axisLabel = { color: C.muted, fontFamily: CHART_MONO, fontSize: 11 };
const axisName = { color: C.muted, fontFamily: CHART_FONT, fontSize: 12 };
const base = {
  textStyle: { fontFamily: CHART_FONT, color: C.ink },
  grid: { left: 56, right: 16, top: 36, bottom: 44 },
  animation: false,
};
/** The box plot's top: a little above the largest whisker, never above log V (the most I_t can be). */
function niceTop(largest: number, logV: number): number {
  const top = Math.max(0.05, largest * 1.15);
  const step = top > 1 ? 0.5 : top > 0.2 ? 0.1 : 0.02;
  return Math.min(Math.ceil(logV * 100) / 100, Math.ceil(top / step) * step);
}
const fix3 = (x: number) => (Number.isFinite(x) ? x.toFixed(3) : '—');

/** One box per position t: I_t across the detail words (min, quartiles, max), bits. */
export function noiseBoxOptions(r: SsmEvaluation): EChartsCoreOption {
  const rows = r.noise.perPosition;
  return {
    ...base,
    tooltip: {
      trigger: 'item',
      formatter: (p: { dataIndex: number }) => {
        const b = rows[p.dataIndex];
        return b ? `position ${b.t}<br>max ${fix3(b.max)} · q3 ${fix3(b.q3)} · median ${fix3(b.median)} · q1 ${fix3(b.q1)} · min ${fix3(b.min)} bits<br>${b.n} words` : '';
      },
    },
    xAxis: { type: 'category', data: rows.map((b) => String(b.t)), name: 'position t', nameLocation: 'middle', nameGap: 28, nameTextStyle: axisName, axisLabel },
    yAxis: { type: 'value', name: 'I_t (bits)', min: 0, max: niceTop(rows.reduce((m, b) => Math.max(m, b.max), 0), r.noise.maxBits), nameTextStyle: axisName, axisLabel, splitLine: { lineStyle: { color: C.rule } } },
    series: [{
      type: 'boxplot', name: 'noise mutual information',
      itemStyle: { color: '#d7ebe8', borderColor: C.teal, borderWidth: 1.5 },
      data: rows.map((b) => [b.min, b.q1, b.median, b.q3, b.max]),
    }],
  };
}

/** Mean observation entropy of the model beside the GRU baseline's predictive entropy on the same words, bits. */
export function entropyBarOptions(r: SsmEvaluation): EChartsCoreOption {
  const gru = r.baselines.gru?.predictiveEntropy.meanBits;
  const names = gru === undefined ? ['this model'] : ['this model', 'GRU baseline'];
  const values = gru === undefined ? [r.observationEntropy.meanBits] : [r.observationEntropy.meanBits, gru];
  return {
    ...base,
    grid: { left: 110, right: 56, top: 16, bottom: 40 },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => `${fix3(v)} bits` },
    yAxis: { type: 'category', data: names, axisLabel: { ...axisLabel, fontFamily: CHART_FONT }, inverse: true },
    xAxis: { type: 'value', name: 'bits per step', nameLocation: 'middle', nameGap: 26, nameTextStyle: axisName, axisLabel, splitLine: { lineStyle: { color: C.rule } } },
    series: [{
      type: 'bar', barWidth: 22,
      data: values.map((v, i) => ({ value: v, itemStyle: { color: i === 0 ? C.teal : C.amber } })),
      label: { show: true, position: 'right', fontFamily: CHART_MONO, color: C.ink, formatter: (p: { value: number }) => fix3(p.value) },
    }],
  };
}

/** Share of samples by length beside the share of corpus tokens by length. */
export function sampleLengthOptions(r: SsmEvaluation): EChartsCoreOption {
  const h = r.samples.lengthHistogram;
  const n = Math.max(h.samples.length, h.corpusTokens.length);
  const lengths = Array.from({ length: Math.max(0, n - 1) }, (_, i) => i + 1);
  const pct = (xs: number[]) => lengths.map((l) => 100 * (xs[l] ?? 0));
  return {
    ...base,
    legend: { top: 0, right: 0, textStyle: { fontFamily: CHART_FONT, color: C.muted } },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => `${v.toFixed(1)} %` },
    xAxis: { type: 'category', data: lengths.map(String), name: 'length (characters)', nameLocation: 'middle', nameGap: 28, nameTextStyle: axisName, axisLabel },
    yAxis: { type: 'value', name: 'share (%)', nameTextStyle: axisName, axisLabel, splitLine: { lineStyle: { color: C.rule } } },
    series: [
      { type: 'bar', name: 'samples', data: pct(h.samples), itemStyle: { color: C.teal } },
      { type: 'bar', name: 'corpus (tokens)', data: pct(h.corpusTokens), itemStyle: { color: C.amber } },
    ],
  };
}
