/** A chart in a figure with a caption; `data-figure` names the chart for tests and readers' tools. */
import { tag, text } from './markup.js';

/** Wrap already-safe SVG markup in a figure with an escaped caption. */
export function chartFigure(name: string, svg: string, caption: string): string {
  return tag('figure', { class: 'chart', 'data-figure': name }, `${svg}${tag('figcaption', {}, text(caption))}`);
}
