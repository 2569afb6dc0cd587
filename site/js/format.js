// Number formatting for the page. One fixed locale ("en-US") so every figure
// on the page reads the same way whatever the browser's settings are: the
// decimal point in "37.1%" and in "2.45" must agree.
//
//   formatPercent(0.3710)  -> "37.1%"     one decimal
//   formatPercent(0.00002) -> "< 0.1%"    tiny but not zero
//   formatPercent(0.99996) -> "> 99.9%"   almost but not exactly certain
//   formatCount(1000000)   -> "1,000,000" whole numbers with grouping
//   formatNumber(3.14159)  -> "3.14"      up to `digits` decimals, grouped
//   formatRange(1, 37)     -> "1–37"      (en dash); formatRange(5, 5) -> "5"

const LOCALE = "en-US";

const countFormat = new Intl.NumberFormat(LOCALE, { maximumFractionDigits: 0 });
const numberFormats = new Map();

function numberFormat(digits) {
  let f = numberFormats.get(digits);
  if (!f) {
    f = new Intl.NumberFormat(LOCALE, { maximumFractionDigits: digits, minimumFractionDigits: 0 });
    numberFormats.set(digits, f);
  }
  return f;
}

/** True for a finite number (not null, not NaN, not a string). */
export function isNum(x) {
  return typeof x === "number" && Number.isFinite(x);
}

/** A probability as a percentage with one decimal; "—" when not available. */
export function formatPercent(p) {
  if (!isNum(p)) return "—";
  if (p <= 0) return "0%";
  if (p >= 1) return "100%";
  if (p < 0.0005) return "< 0.1%";
  if (p >= 0.9995) return "> 99.9%";
  return `${(p * 100).toFixed(1)}%`;
}

/** A whole number with grouping ("1,000,000"). */
export function formatCount(n) {
  if (!isNum(n)) return "—";
  return countFormat.format(Math.round(n));
}

/** A number with grouping and at most `digits` decimals ("1,234.57"). */
export function formatNumber(x, digits = 2) {
  if (!isNum(x)) return "—";
  const f = numberFormat(digits);
  const text = f.format(x);
  // "-0" reads oddly; a value that rounds to zero is shown as 0.
  return text === "-0" ? "0" : text;
}

/** A range of whole numbers, "1–37" (en dash), or one number when first == last. */
export function formatRange(first, last) {
  if (first === last) return formatCount(first);
  return `${formatCount(first)}–${formatCount(last)}`;
}

/** "1 candidate" / "3 candidates". */
export function plural(n, one, many) {
  return `${formatCount(n)} ${n === 1 ? one : many}`;
}
