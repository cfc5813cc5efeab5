/** echarts options for the corpus charts, built from the stored statistics (pure functions). */
import type { EChartsCoreOption } from 'echarts/core';
import type { CorpusStats } from '../corpora-api';
import { CHART_COLOURS as C, CHART_FONT, CHART_MONO } from './chart-setup';

const axisStyle = {
  axisLine: { lineStyle: { color: C.muted } },
  axisLabel: { color: C.muted, fontFamily: CHART_MONO },
  splitLine: { lineStyle: { color: C.rule } },
  nameTextStyle: { color: C.muted, fontFamily: CHART_FONT },
};

const base = {
  backgroundColor: 'transparent',
  textStyle: { fontFamily: CHART_FONT, color: C.ink },
  tooltip: { trigger: 'axis', axisPointer: { type: 'shadow' }, backgroundColor: C.paper, borderColor: C.rule, textStyle: { color: C.ink } },
  animation: false,
};

const pct = (x: number) => Math.round(x * 10000) / 100;

/** Share of types and of tokens per word length (percent), side by side. */
export function lengthHistogramOptions(stats: CorpusStats): EChartsCoreOption {
  const bins = stats.lengthHistogram;
  return {
    ...base,
    legend: { data: ['Types', 'Tokens'], top: 0, textStyle: { color: C.ink } },
    grid: { left: 48, right: 16, top: 32, bottom: 40 },
    xAxis: { type: 'category', name: 'characters', nameLocation: 'middle', nameGap: 26, data: bins.map((b) => String(b.length)), ...axisStyle },
    yAxis: { type: 'value', name: '%', ...axisStyle },
    series: [
      { name: 'Types', type: 'bar', itemStyle: { color: C.teal }, data: bins.map((b) => pct(stats.types > 0 ? b.types / stats.types : 0)) },
      { name: 'Tokens', type: 'bar', itemStyle: { color: C.amber }, data: bins.map((b) => pct(stats.tokens > 0 ? b.tokens / stats.tokens : 0)) },
    ],
  };
}

/** Token-weighted share of each character, most frequent first (at most `limit` characters). */
export function characterFrequencyOptions(stats: CorpusStats, limit = 40): EChartsCoreOption {
  const chars = stats.charFrequencies.slice(0, limit);
  return {
    ...base,
    grid: { left: 48, right: 16, top: 16, bottom: 32 },
    xAxis: { type: 'category', data: chars.map((c) => c.char), ...axisStyle, axisLabel: { ...axisStyle.axisLabel, interval: 0 } },
    yAxis: { type: 'value', name: '%', ...axisStyle },
    series: [{ name: 'Share of characters', type: 'bar', itemStyle: { color: C.teal }, data: chars.map((c) => pct(c.share)) }],
  };
}

/** The most frequent words with their counts, the most frequent at the top. */
export function topWordsOptions(stats: CorpusStats, limit = 15): EChartsCoreOption {
  const words = stats.topWords.slice(0, limit).reverse();
  return {
    ...base,
    grid: { left: 120, right: 24, top: 8, bottom: 32 },
    xAxis: { type: 'value', name: 'count', nameLocation: 'middle', nameGap: 24, ...axisStyle },
    yAxis: { type: 'category', data: words.map((w) => w.word), ...axisStyle },
    series: [{ name: 'Count', type: 'bar', itemStyle: { color: C.amber }, data: words.map((w) => w.count) }],
  };
}
