import type { ComparisonRow } from "@calmcrest/contracts";

/**
 * How each compared site is drawn: a colour from a palette that stays distinct for the common forms of colour
 * blindness (the Okabe–Ito set), and, so the lines never depend on colour alone, a dash pattern and a marker shape.
 */
export interface SeriesStyle {
  colour: string;
  dash: string;
  marker: "circle" | "square" | "triangle" | "diamond" | "cross" | "star";
  /** The marker and dash in words, for legends and screen readers. */
  words: string;
}

export const SERIES_STYLES: readonly SeriesStyle[] = [
  { colour: "#0072b2", dash: "", marker: "circle", words: "solid line, circles" },
  { colour: "#d55e00", dash: "9 4", marker: "square", words: "long dashes, squares" },
  { colour: "#009e73", dash: "2 3", marker: "triangle", words: "dotted line, triangles" },
  { colour: "#cc79a7", dash: "12 4 2 4", marker: "diamond", words: "dash-dot line, diamonds" },
  { colour: "#7a5a00", dash: "5 5", marker: "cross", words: "short dashes, crosses" },
  { colour: "#1c2733", dash: "1 4 8 4", marker: "star", words: "dot-dash line, stars" },
];

export const styleOf = (index: number): SeriesStyle => SERIES_STYLES[index % SERIES_STYLES.length] ?? { colour: "#1c2733", dash: "", marker: "circle", words: "solid line" };

/** A marker shape centred on (x, y). */
export function MarkerShape({ style, x, y, size = 5 }: { style: SeriesStyle; x: number; y: number; size?: number }) {
  const common = { fill: style.colour, stroke: "#ffffff", strokeWidth: 1 };
  switch (style.marker) {
    case "circle":
      return <circle cx={x} cy={y} r={size} {...common} />;
    case "square":
      return <rect x={x - size} y={y - size} width={size * 2} height={size * 2} {...common} />;
    case "triangle":
      return <path d={`M${x},${y - size * 1.2} L${x + size * 1.1},${y + size} L${x - size * 1.1},${y + size} Z`} {...common} />;
    case "diamond":
      return <path d={`M${x},${y - size * 1.3} L${x + size},${y} L${x},${y + size * 1.3} L${x - size},${y} Z`} {...common} />;
    case "cross":
      return <path d={`M${x - size},${y - size} L${x + size},${y + size} M${x + size},${y - size} L${x - size},${y + size}`} stroke={style.colour} strokeWidth={2.5} fill="none" />;
    case "star": {
      const points = Array.from({ length: 10 }, (_, index) => {
        const radius = index % 2 === 0 ? size * 1.3 : size * 0.55;
        const angle = (Math.PI / 5) * index - Math.PI / 2;
        return `${x + radius * Math.cos(angle)},${y + radius * Math.sin(angle)}`;
      });
      return <polygon points={points.join(" ")} {...common} />;
    }
  }
}

/** A legend entry: a short stretch of the line with its marker, then the name. */
export function LegendSwatch({ style }: { style: SeriesStyle }) {
  return (
    <svg width="40" height="14" aria-hidden="true" className="inline-block align-middle">
      <line x1="2" x2="38" y1="7" y2="7" stroke={style.colour} strokeWidth="2.5" strokeDasharray={style.dash || undefined} />
      <MarkerShape style={style} x={20} y={7} size={4} />
    </svg>
  );
}

/** The legend of the compared sites: line, marker and name, in the table's order. */
export function SeriesLegend({ rows }: { rows: ComparisonRow[] }) {
  return (
    <ul className="flex flex-wrap gap-x-5 gap-y-1 text-sm" aria-label="Line styles of the compared sites">
      {rows.map((row, index) => (
        <li key={row.key} className="flex items-center gap-1.5">
          <LegendSwatch style={styleOf(index)} />
          <span>{row.label}</span>
          <span className="sr-only">({styleOf(index).words})</span>
        </li>
      ))}
    </ul>
  );
}
