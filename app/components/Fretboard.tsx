// The neck: a to-scale SVG fretboard that shows spots and, when given onTap, takes answers by touch, mouse or keys.
import { useEffect, useRef, useState, type KeyboardEvent } from "react";
import type { Spot } from "~/music/fretboard";
import { displayPitchClass } from "~/music/pitch";
import { spellInKey } from "~/music/keys";
import type { Tuning } from "~/music/tuning";
import { plural } from "~/lib/plural";
import {
  fretboardLayout,
  heatShare,
  isNavKey,
  moveSpot,
  SIZE_METRICS,
  type FretboardLayout as Layout,
  type FretboardSize,
  type Rect,
} from "./fretboardLayout";

type FretRange = { first: number; last: number };

export type SpotKind = "home" | "other" | "tapped" | "tapped-right" | "tapped-wrong";
export interface Highlight extends Spot {
  kind: SpotKind;
  /** Text on the marker instead of its icon, e.g. the written note on a home-spot map. */
  label?: string;
}
export interface HeatSpot extends Spot {
  count: number;
}

/** Every kind has an icon and words as well as a colour. */
const KINDS: Record<SpotKind, { fill: string; icon: Icon; words: string }> = {
  home: { fill: "fill-teal", icon: "check", words: "home spot" },
  other: { fill: "fill-sky", icon: "same", words: "other spot, same pitch" },
  tapped: { fill: "fill-ink", icon: "dot", words: "your tap" },
  "tapped-right": { fill: "fill-teal", icon: "check", words: "your tap, right pitch" },
  "tapped-wrong": { fill: "fill-brick", icon: "cross", words: "your tap, wrong" },
};

export interface FretboardProps {
  tuning: Tuning;
  frets: number;
  /** Marks this position's four frets and zooms to them (with a margin); the rest of the neck scrolls. */
  position?: number;
  /** Fits the whole neck instead of zooming, the position still marked: a wide screen showing every spot of a pitch. */
  wholeNeck?: boolean;
  leftHanded?: boolean;
  highlights?: Highlight[];
  heat?: HeatSpot[];
  /** Makes every spot a button; without it the board is a picture described in words. */
  onTap?: (spot: Spot) => void;
  disabled?: boolean;
  size?: FretboardSize;
  stringLabels?: boolean;
  fretLabels?: boolean;
  legend?: boolean;
  /** Accessible name; defaults to the tuning and neck length. */
  label?: string;
  className?: string;
}

const spotKey = (s: Spot) => `${s.string}:${s.fret}`;
const spotWords = (s: Spot) => `string ${s.string}, ${s.fret === 0 ? "open" : `fret ${s.fret}`}`;

export function Fretboard({
  tuning,
  frets,
  position,
  wholeNeck = false,
  leftHanded = false,
  highlights = [],
  heat = [],
  onTap,
  disabled = false,
  size = "page",
  stringLabels = true,
  fretLabels = true,
  legend = true,
  label,
  className = "",
}: FretboardProps) {
  const scroller = useRef<HTMLDivElement>(null);
  const spotRefs = useRef(new Map<string, SVGGElement>());
  // A phone's width until the real one is measured after hydration.
  const [viewportWidth, setViewportWidth] = useState(360);
  const strings = tuning.strings.length;
  const zoom = position === undefined ? undefined : { first: position, last: Math.min(frets, position + 3) };
  const layout = fretboardLayout({
    strings,
    frets,
    size,
    leftHanded,
    viewportWidth,
    // The hand's one-fret stretches either side of the position hold home spots too, so they fit on screen as well.
    window: wholeNeck || !zoom ? undefined : { first: Math.max(0, zoom.first - 1), last: Math.min(frets, zoom.last + 1) },
    fretLabels,
  });
  const metrics = SIZE_METRICS[size];

  useEffect(() => {
    const el = scroller.current;
    if (!el) return;
    const observer = new ResizeObserver(([entry]) => entry && setViewportWidth(Math.round(entry.contentRect.width)));
    observer.observe(el);
    return () => observer.disconnect();
  }, []);

  // Jump to the position when it, the neck or the viewport changes; leave the student's own scrolling alone otherwise.
  useEffect(() => {
    scroller.current?.scrollTo({ left: layout.scrollLeft });
  }, [layout.scrollLeft]);

  const byKey = new Map(highlights.map((h) => [spotKey(h), h]));
  const heatByKey = new Map(heat.map((h) => [spotKey(h), h]));
  const maxHeat = Math.max(0, ...heat.map((h) => h.count));
  const interactive = onTap !== undefined;

  const [focused, setFocused] = useState<Spot>(() => highlights[0] ?? { string: 1, fret: position ?? 0 });
  const focusSpot = (spot: Spot) => {
    setFocused(spot);
    spotRefs.current.get(spotKey(spot))?.focus();
  };
  const tap = (spot: Spot) => {
    setFocused(spot);
    if (!disabled) onTap?.(spot);
  };
  const onKeyDown = (event: KeyboardEvent<SVGGElement>, spot: Spot) => {
    if (isNavKey(event.key)) {
      event.preventDefault();
      focusSpot(moveSpot(spot, event.key, { strings, frets, leftHanded }));
    } else if (event.key === "Enter" || event.key === " ") {
      event.preventDefault();
      tap(spot);
    }
  };

  const describe = (spot: Spot) => {
    const h = byKey.get(spotKey(spot));
    const n = heatByKey.get(spotKey(spot))?.count;
    return [
      spotWords(spot),
      h ? (h.label ? `${h.label}, ${KINDS[h.kind].words}` : KINDS[h.kind].words) : null,
      n ? plural(n, "answer") : null,
    ]
      .filter(Boolean)
      .join(", ");
  };
  const name = label ?? `Fretboard, ${tuning.name} tuning, ${frets} frets${leftHanded ? ", left-handed" : ""}`;
  const marked = [...new Set([...byKey.keys(), ...heatByKey.keys()])].map((k) => {
    const [s, f] = k.split(":").map(Number);
    return { string: s!, fret: f! };
  });
  const summary = marked.length ? `${name}. ${marked.map(describe).join("; ")}.` : `${name}.`;
  const cells = Array.from({ length: strings }, (_, i) =>
    Array.from({ length: frets + 1 }, (_, fret) => ({ string: i + 1, fret })),
  ).flat();
  const focusKey = spotKey(focused.string <= strings && focused.fret <= frets ? focused : { string: 1, fret: 0 });

  // String names stay outside the scrolling neck, on the nut's side, so they are in view at any position.
  const names = stringLabels ? <StringLabels layout={layout} tuning={tuning} font={metrics.font} /> : null;
  const big = size === "stage";
  const key = legend ? <Legend kinds={[...new Set(highlights.filter((h) => !h.label).map((h) => h.kind))]} heat={heat.length > 0} big={big} /> : null;
  return (
    <div className={`min-w-0 ${className}`}>
      {/* A projected neck runs to the bottom of the screen: its key goes on top, where the room sees it without scrolling. */}
      {big ? key : null}
      <div className="flex items-start">
        {leftHanded ? null : names}
        <div
          ref={scroller}
          className="min-w-0 flex-1 overflow-x-auto overscroll-x-contain rounded-2xl"
          // A neck with no spots to tab to still scrolls sideways: it takes the focus itself so arrow keys can scroll it.
          {...(interactive ? {} : { tabIndex: 0, role: "region", "aria-label": `${name}, scrolls sideways` })}
          style={{ scrollbarGutter: "stable" }}
        >
          <svg
            width={layout.width}
            height={layout.height}
            viewBox={`0 0 ${layout.width} ${layout.height}`}
            role={interactive ? "group" : "img"}
            aria-label={interactive ? `${name}${disabled ? ", locked" : ""}` : summary}
            className="block select-none"
            style={{ fontSize: metrics.font }}
          >
            {/* A locked board dims, but the marks on it (the answer, your tap) stay at full strength. */}
            <g opacity={disabled ? 0.6 : 1}>
              <Board layout={layout} zoom={zoom} strings={strings} />
              {fretLabels ? <FretLabels layout={layout} frets={frets} zoom={zoom} /> : null}
            </g>
            {heat.map((h) => (
              <HeatMark
                key={`heat-${spotKey(h)}`}
                cell={layout.cell(h)}
                count={h.count}
                share={heatShare(h.count, maxHeat)}
                shifted={byKey.has(spotKey(h))}
                font={metrics.font}
              />
            ))}
            {highlights.map((h) => (
              <Marker key={`mark-${spotKey(h)}`} cell={layout.cell(h)} highlight={h} />
            ))}
            {interactive
              ? cells.map((spot) => {
                  const key = spotKey(spot);
                  const c = layout.cell(spot);
                  return (
                    <g
                      key={key}
                      ref={(el) => {
                        if (el) spotRefs.current.set(key, el);
                        else spotRefs.current.delete(key);
                      }}
                      role="button"
                      tabIndex={key === focusKey ? 0 : -1}
                      aria-label={describe(spot)}
                      aria-disabled={disabled || undefined}
                      onClick={() => tap(spot)}
                      onKeyDown={(e) => onKeyDown(e, spot)}
                      className={`group outline-none ${disabled ? "cursor-not-allowed" : "cursor-pointer"}`}
                    >
                      <rect x={c.x} y={c.y} width={c.width} height={c.height} className="fill-transparent" />
                      <rect
                        x={c.x + 2}
                        y={c.y + 2}
                        width={c.width - 4}
                        height={c.height - 4}
                        rx={8}
                        className="fill-none stroke-sky opacity-0 group-focus-visible:opacity-100 [@media(hover:hover)]:group-hover:opacity-50"
                        strokeWidth={3}
                      />
                    </g>
                  );
                })
              : null}
          </svg>
        </div>
        {leftHanded ? names : null}
      </div>
      {layout.width > viewportWidth + 1 ? (
        <p className="mt-1 text-sm text-ink-soft">Scroll sideways for the rest of the neck.</p>
      ) : null}
      {disabled ? <p className="mt-1 text-sm text-ink-soft">Locked</p> : null}
      {size === "stage" ? null : key}
    </div>
  );
}

function Board({ layout, zoom, strings }: { layout: Layout; zoom?: FretRange; strings: number }) {
  const { board, wires, stringY } = layout;
  // The open-string cells lie outside the board, so strings start at the far edge of those cells.
  const open = layout.cell({ string: 1, fret: 0 });
  const nutOnLeft = wires[0]! < wires[1]!;
  const stringFrom = nutOnLeft ? open.x : open.x + open.width;
  const stringTo = nutOnLeft ? board.x + board.width : board.x;
  return (
    <g aria-hidden="true">
      <rect x={board.x} y={board.y} width={board.width} height={board.height} className="fill-rosewood" rx={4} />
      {zoom ? <ZoomShade layout={layout} zoom={zoom} /> : null}
      {layout.inlays.map((d, i) => (
        <circle
          key={i}
          cx={d.x}
          cy={d.y}
          r={Math.min(9, board.height / strings / 5)}
          className="fill-paper-deep"
          opacity={0.75}
        />
      ))}
      {wires.map((x, n) =>
        n === 0 ? (
          <rect key={n} x={x - 4} y={board.y} width={8} height={board.height} className="fill-paper-deep" />
        ) : (
          <line
            key={n}
            x1={x}
            x2={x}
            y1={board.y}
            y2={board.y + board.height}
            className="stroke-brass"
            strokeWidth={3}
          />
        ),
      )}
      {stringY.map((y, i) => (
        // Lower strings are thicker, as on the instrument.
        <line
          key={i}
          x1={stringFrom}
          x2={stringTo}
          y1={y}
          y2={y}
          className="stroke-paper"
          strokeWidth={1 + i * 0.5}
          opacity={0.9}
        />
      ))}
    </g>
  );
}

/** A faint brass band marks the position's frets on the board. */
function ZoomShade({ layout, zoom }: { layout: Layout; zoom: FretRange }) {
  const a = layout.cell({ string: 1, fret: zoom.first });
  const b = layout.cell({ string: 1, fret: zoom.last });
  const x = Math.min(a.x, b.x);
  const width = Math.max(a.x + a.width, b.x + b.width) - x;
  return (
    <rect x={x} y={layout.board.y} width={width} height={layout.board.height} className="fill-brass" opacity={0.12} />
  );
}

function StringLabels({ layout, tuning, font }: { layout: Layout; tuning: Tuning; font: number }) {
  const width = font * 2.6;
  return (
    <svg
      width={width}
      height={layout.height}
      aria-hidden="true"
      className="shrink-0 fill-ink"
      textAnchor="middle"
      style={{ fontSize: font }}
    >
      {layout.stringY.map((y, i) => (
        <text key={i} x={width / 2} y={y} dominantBaseline="central">
          <tspan fontWeight={600}>{i + 1}</tspan>
          <tspan dx={3} fontSize="0.75em">
            {displayPitchClass(spellInKey(tuning.strings[i]!, 0))}
          </tspan>
        </text>
      ))}
    </svg>
  );
}

function FretLabels({ layout, frets, zoom }: { layout: Layout; frets: number; zoom?: FretRange }) {
  return (
    <g aria-hidden="true" className="fill-ink" textAnchor="middle">
      {Array.from({ length: frets + 1 }, (_, fret) => {
        const c = layout.cell({ string: 1, fret });
        const inZoom = zoom && fret >= zoom.first && fret <= zoom.last;
        return (
          <text
            key={fret}
            data-fret-label={fret}
            x={c.x + c.width / 2}
            y={layout.fretLabelY}
            fontWeight={inZoom ? 700 : 400}
            opacity={inZoom || !zoom ? 1 : 0.7}
          >
            {fret}
          </text>
        );
      })}
    </g>
  );
}

type Icon = "check" | "cross" | "same" | "dot";

/** Icons as paths, so they look the same whatever fonts the device has. */
function IconPath({ icon, r }: { icon: Icon; r: number }) {
  const k = r * 0.5;
  const common = {
    fill: "none",
    strokeWidth: Math.max(2.5, r * 0.22),
    strokeLinecap: "round" as const,
    strokeLinejoin: "round" as const,
    className: "stroke-white",
  };
  switch (icon) {
    case "check":
      return <path d={`M ${-k} 0 L ${-k * 0.3} ${k * 0.7} L ${k} ${-k * 0.6}`} {...common} />;
    case "cross":
      return (
        <path
          d={`M ${-k * 0.7} ${-k * 0.7} L ${k * 0.7} ${k * 0.7} M ${k * 0.7} ${-k * 0.7} L ${-k * 0.7} ${k * 0.7}`}
          {...common}
        />
      );
    case "same":
      return (
        <path
          d={`M ${-k * 0.7} ${-k * 0.35} L ${k * 0.7} ${-k * 0.35} M ${-k * 0.7} ${k * 0.35} L ${k * 0.7} ${k * 0.35}`}
          {...common}
        />
      );
    case "dot":
      return <circle r={k * 0.45} className="fill-white" />;
  }
}

function Marker({ cell, highlight }: { cell: Rect; highlight: Highlight }) {
  const kind = KINDS[highlight.kind];
  const r = Math.min(cell.width, cell.height) * 0.4;
  return (
    <g
      aria-hidden="true"
      transform={`translate(${cell.x + cell.width / 2} ${cell.y + cell.height / 2})`}
      pointerEvents="none"
    >
      <circle r={r} className={`${kind.fill} stroke-paper`} strokeWidth={2} />
      {highlight.kind.startsWith("tapped") ? (
        <circle r={r + 4} className="fill-none stroke-brass" strokeWidth={3} />
      ) : null}
      {highlight.label ? (
        <text
          textAnchor="middle"
          dominantBaseline="central"
          className="fill-white"
          // Longer names ("Sol♯5", "Fisis5") shrink to stay inside the mark; "F♯5" keeps the full size.
          fontSize={Math.min(r * 0.8, 18) * Math.min(1, 3.5 / [...highlight.label].length)}
          fontWeight={600}
        >
          {highlight.label}
        </text>
      ) : (
        <IconPath icon={kind.icon} r={r} />
      )}
    </g>
  );
}

function HeatMark({ cell, count, share, shifted, font }: { cell: Rect; count: number; share: number; shifted: boolean; font: number }) {
  const cx = cell.x + cell.width / 2;
  const cy = cell.y + cell.height / 2;
  const r = Math.min(cell.width, cell.height) * (0.25 + 0.25 * share);
  // With a marker on the same spot, the count moves to a badge in the cell's corner, in the board's own
  // lettering size so the stage's counts read from the back of the room.
  const badge = font * 0.8;
  const tx = shifted ? cell.x + cell.width - badge : cx;
  const ty = shifted ? cell.y + badge : cy;
  return (
    <g aria-hidden="true" pointerEvents="none">
      <circle cx={cx} cy={cy} r={r} className="fill-brass" opacity={0.3 + 0.45 * share} />
      {shifted ? <circle cx={tx} cy={ty} r={badge} className="fill-brass stroke-paper" strokeWidth={2} /> : null}
      <text
        data-heat-count={count}
        x={tx}
        y={ty}
        textAnchor="middle"
        dominantBaseline="central"
        fontWeight={700}
        className={shifted ? "fill-rosewood" : "fill-paper"}
      >
        {count}
      </text>
    </g>
  );
}

function Legend({ kinds, heat, big }: { kinds: SpotKind[]; heat: boolean; big: boolean }) {
  if (kinds.length === 0 && !heat) return null;
  return (
    <ul aria-hidden="true" data-legend className={`flex flex-wrap gap-x-4 gap-y-1 ${big ? "mb-2 text-2xl" : "mt-2 text-sm"}`}>
      {kinds.map((k) => (
        <li key={k} className="flex items-center gap-1.5">
          <svg width="1.2em" height="1.2em" viewBox="-10 -10 20 20" aria-hidden="true">
            <circle r={9} className={KINDS[k].fill} />
            <IconPath icon={KINDS[k].icon} r={9} />
          </svg>
          {KINDS[k].words}
        </li>
      ))}
      {heat ? (
        <li className="flex items-center gap-1.5">
          <svg width="1.2em" height="1.2em" viewBox="-10 -10 20 20" aria-hidden="true">
            <circle r={9} className="fill-brass" opacity={0.6} />
          </svg>
          brass circle: how many answered there
        </li>
      ) : null}
    </ul>
  );
}
