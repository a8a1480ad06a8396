/**
 * Width of chart text in the chart font (DejaVu Sans, src/charts/render.ts CHART_FONT), computed
 * from the font's own advance widths, so that vega lays out axes, legends and titles, and the
 * label placer (src/charts/labels.ts) places labels, by the width the text really takes.
 *
 * Without a canvas, vega estimates every character as 0.8 em: about 1.3 times too wide for
 * DejaVu Sans, which leaves blank bands beside long axis titles and makes label layout guesswork.
 *
 * Source of the numbers: the advance widths (hmtx table, 2048 units per em) of DejaVu Sans 2.37
 * (Book and Bold; Debian package fonts-dejavu-core 2.37-6), read for each character below from the
 * font's Unicode cmap. Kerning is ignored, so a measured width is at most a little wider than drawn.
 * A character not in the table counts as WIDE_FALLBACK em.
 */

/** Characters measured after U+0020–U+007E and U+00A0–U+017F, in this order. */
const EXTRA = '–—−‐‘’“”•…→←↑↓≤≥≈Δαβγκλμσ⁻⁰⁴⁵⁶⁷⁸⁹₀₁₂₃₄₅₆₇₈₉▲▼●◆■○△▽◇′″';
/** Advance widths, 1/2048 em, DejaVu Sans Book. */
const BOOK = [
  651,821,942,1716,1303,1946,1597,563,799,799,1024,1716,651,739,651,690,1303,1303,1303,1303,1303,1303,1303,1303,1303,1303,690,690,1716,1716,1716,1087,
  2048,1401,1405,1430,1577,1294,1178,1587,1540,604,604,1343,1141,1767,1532,1612,1235,1612,1423,1300,1251,1499,1401,2025,1403,1251,1403,799,690,799,1716,1024,
  1024,1255,1300,1126,1300,1260,721,1300,1298,569,569,1186,569,1995,1298,1253,1300,1300,842,1067,803,1298,1212,1675,1212,1212,1075,1303,690,1303,1716,651,
  821,1303,1303,1303,1303,690,1024,1024,2048,965,1253,1716,739,2048,1024,1024,1716,821,821,1024,1303,1303,651,1024,821,965,1253,1985,1985,1985,1087,1401,
  1401,1401,1401,1401,1401,1995,1430,1294,1294,1294,1294,604,604,604,604,1587,1532,1612,1612,1612,1612,1612,1716,1612,1499,1499,1499,1499,1251,1239,1290,1255,
  1255,1255,1255,1255,1255,2011,1126,1260,1260,1260,1260,569,569,569,569,1253,1298,1253,1253,1253,1253,1253,1716,1253,1298,1298,1298,1298,1212,1300,1212,1401,
  1255,1401,1255,1401,1255,1430,1126,1430,1126,1430,1126,1430,1126,1577,1300,1587,1300,1294,1260,1294,1260,1294,1260,1294,1260,1294,1260,1587,1300,1587,1300,1587,
  1300,1587,1300,1540,1298,1876,1423,604,569,604,569,604,569,604,569,604,569,1208,1138,604,569,1343,1186,1186,1141,569,1141,569,1141,768,1141,700,
  1151,582,1532,1298,1532,1298,1532,1298,1666,1532,1298,1612,1253,1612,1253,1612,1253,2191,2095,1423,842,1423,842,1423,842,1300,1067,1300,1067,1300,1067,1300,
  1067,1251,803,1251,803,1251,803,1499,1298,1499,1298,1499,1298,1499,1298,1499,1298,1499,1298,2025,1675,1251,1212,1251,1403,1075,1403,1075,1403,1075,721,1024,
  2048,1716,739,651,651,1061,1061,1208,2048,1716,1716,1716,1716,1716,1716,1716,1401,1350,1307,1212,1207,1212,1303,1298,1081,821,821,821,821,821,821,821,
  821,821,821,821,821,821,821,821,821,821,1575,1575,1787,1575,1935,1787,1575,1575,1575,465,765,
];
/** Advance widths, 1/2048 em, DejaVu Sans Bold. */
const BOLD = [
  713,934,1067,1716,1425,2052,1786,627,936,936,1071,1716,778,850,778,748,1425,1425,1425,1425,1425,1425,1425,1425,1425,1425,819,819,1716,1716,1716,1188,
  2048,1585,1561,1503,1700,1399,1399,1681,1714,762,762,1587,1305,2038,1714,1741,1501,1741,1577,1475,1397,1663,1585,2259,1579,1483,1485,936,748,936,1716,1024,
  1024,1382,1466,1214,1466,1389,891,1466,1458,702,702,1362,702,2134,1458,1407,1466,1466,1010,1219,979,1458,1335,1892,1321,1335,1192,1458,748,1458,1716,713,
  934,1425,1425,1303,1425,748,1024,1024,2048,1155,1323,1716,850,2048,1024,1024,1716,897,897,1024,1507,1303,778,1024,897,1155,1323,2120,2120,2120,1188,1585,
  1585,1585,1585,1585,1585,2222,1503,1399,1399,1399,1399,762,762,762,762,1716,1714,1741,1741,1741,1741,1741,1716,1741,1663,1663,1663,1663,1483,1511,1473,1382,
  1382,1382,1382,1382,1382,2146,1214,1389,1389,1389,1389,702,702,702,702,1407,1458,1407,1407,1407,1407,1407,1716,1407,1458,1458,1458,1458,1335,1466,1335,1585,
  1382,1585,1382,1585,1382,1503,1214,1503,1214,1503,1214,1503,1214,1700,1466,1716,1466,1399,1389,1399,1389,1399,1389,1399,1389,1399,1389,1681,1466,1681,1466,1681,
  1466,1681,1466,1714,1458,1994,1618,762,702,762,702,762,702,762,702,762,702,1524,1404,762,702,1587,1362,1362,1305,702,1305,702,1305,982,1305,1140,
  1315,760,1714,1458,1714,1458,1714,1458,2013,1714,1458,1741,1407,1741,1407,1741,1407,2390,2241,1577,1010,1577,1010,1577,1010,1475,1219,1475,1219,1475,1219,1475,
  1219,1397,979,1397,979,1397,979,1663,1458,1663,1458,1663,1458,1663,1458,1663,1458,1663,1458,2259,1892,1483,1335,1483,1485,1192,1485,1192,1485,1192,891,1024,
  2048,1716,850,778,778,1346,1346,1309,2048,1716,1716,1716,1716,1716,1716,1716,1585,1407,1466,1395,1455,1296,1507,1595,1081,897,897,897,897,897,897,897,
  897,897,897,897,897,897,897,897,897,897,1575,1575,1787,1575,1935,1787,1575,1575,1575,540,915,
];

/** Width in em of a character not in the table: wider than any Latin letter but M and W. */
export const WIDE_FALLBACK = 0.9;

function tableOf(widths: readonly number[]): Map<string, number> {
  const chars: string[] = [];
  for (let c = 0x20; c <= 0x7e; c++) chars.push(String.fromCharCode(c));
  for (let c = 0xa0; c <= 0x17f; c++) chars.push(String.fromCharCode(c));
  chars.push(...EXTRA);
  if (chars.length !== widths.length) throw new Error(`text-width: ${chars.length} characters but ${widths.length} widths`);
  // chars[i] exists for every i of widths: the lengths are equal (checked above).
  return new Map(widths.map((w, i) => [chars[i]!, w / 2048]));
}

const TABLES = { normal: tableOf(BOOK), bold: tableOf(BOLD) };

/** True for a CSS/vega font weight that DejaVu Sans draws bold ('bold', 'bolder', 600 and above). */
export function isBold(weight: unknown): boolean {
  if (weight === undefined || weight === null) return false;
  if (typeof weight === 'number') return weight >= 600;
  const w = String(weight).trim();
  return w === 'bold' || w === 'bolder' || (/^\d+$/.test(w) && Number(w) >= 600);
}

/**
 * Width in px of one line of text at `fontSize` px. Example: textWidth('0', 10) → 6.36
 * (DejaVu Sans digits are 1303/2048 em).
 */
export function textWidth(text: string, fontSize: number, bold = false): number {
  const table = bold ? TABLES.bold : TABLES.normal;
  let em = 0;
  for (const ch of text) em += table.get(ch) ?? WIDE_FALLBACK;
  return em * fontSize;
}

/** The part of a vega text item that its width depends on. */
interface TextItem {
  fontSize?: number | string;
  fontWeight?: unknown;
}

/**
 * Width of one line of a vega text item, as vega's `textMetrics.width(item, text)` hook is asked
 * for it: font size (vega's default 11) and weight from the item, the text untruncated. Vega
 * truncates to an item's `limit` itself, measuring with this function (a width that applied the
 * limit too would always fit, and nothing would be truncated); a truncated item's bounds are then
 * those of its full text, a little wider than drawn.
 */
export function vegaTextWidth(item: TextItem, text: unknown): number {
  const size = item.fontSize !== undefined && item.fontSize !== null ? Number(item.fontSize) || 0 : 11;
  const line = text === null || text === undefined ? '' : String(text).trim();
  if (size <= 0 || line === '') return 0;
  return textWidth(line, size, isBold(item.fontWeight));
}
