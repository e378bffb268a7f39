/**
 * Reports shared by every surface (the CLI now, the desktop renderer later):
 * plain data in, bytes or text out, no Node API. Only writing the files is the
 * surface's business.
 *
 *  - renderPatternImage / encodePatternPng: the pattern on a log scale with the
 *    centre, fitted rings (hkl), masked pixels and predicted rings drawn over it;
 *  - buildAnalysisReport: the PDF report of an analysis or film check (A4);
 *  - ringTableRows: the ring table as CSV rows;
 *  - buildControlChartSvg: a phase's lattice constant over time with its
 *    tolerance band and verdicts.
 */
export { buildAnalysisReport, type AnalysisReportInput, type ReportCalibration, type ReportCalibrationDetails } from './analysis-report';
export { ringTableRows, RING_TABLE_COLUMNS, type RingTableRow } from './ring-table-rows';
export { buildControlChartSvg, escapeXml, type ControlChartOptions, type ControlChartPoint } from './control-chart-svg';
export { renderPatternImage, toImagePixel, type ImagePolarity, type PatternImage, type PatternImageLabel, type PatternImageOptions } from './pattern-image';
export { encodeCanvasPng, encodePatternPng, type PngOptions } from './pattern-png';
export { predictedRingsForReport, type PredictedRingOptions, type ReportPredictedPhase, type ReportPredictedRing } from './predicted-ring-radii';
export { concise, hklText } from './number-text';
export { PALETTE, hexColour, type Rgb } from './palette';
export { FOOTER_CAUTION, REPORT_CAUTIONS } from './report-text';
