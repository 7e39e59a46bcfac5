import { useEffect, useRef, useState, type ReactNode } from "react";
import { useFetcher } from "react-router";

/**
 * Observable Plot labels each mark's <g> (and some shapes) with aria-label but gives them no role;
 * a label needs one (WAI-ARIA: aria-label is not allowed on a generic element), so labelled groups
 * become ARIA groups and labelled shapes images.
 */
export function labelledGroups<T extends Element | null>(chart: T): T {
  chart?.querySelectorAll("[aria-label]:not([role])").forEach((el) => el.setAttribute("role", el.tagName.toLowerCase() === "g" ? "group" : "img"));
  return chart;
}

/** Colour-blind-safe palette (Okabe & Ito 2008) for treatments; charts also label by text. */
export const TREATMENT_COLOURS = ["#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00", "#000000", "#F0E442"];

type ChartJson = { title: string; caption: string; error?: undefined } | { error: string };

/**
 * A chart drawn in the browser from a JSON resource route: loading and error states, a title,
 * a caption in words, and an SVG download. `draw` returns the element Observable Plot made.
 */
export function ChartPanel<T extends { title: string; caption: string }>({
  url,
  draw,
  filename,
  children,
  controls,
}: {
  url: string;
  draw: (data: T, width: number) => Element | null;
  filename: string;
  children?: (data: T) => ReactNode;
  /** Inputs that change what the chart shows, beside the title. */
  controls?: ReactNode;
}) {
  const fetcher = useFetcher<T | { error: string }>();
  const holder = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(640);

  useEffect(() => {
    fetcher.load(url);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [url]);

  useEffect(() => {
    const el = holder.current;
    if (!el) return;
    const observer = new ResizeObserver(([entry]) => setWidth(Math.max(280, Math.floor(entry.contentRect.width))));
    observer.observe(el);
    return () => observer.disconnect();
  }, []);

  const data = fetcher.data as ChartJson | undefined;
  const ready = data && !("error" in data && data.error) ? (data as unknown as T) : null;

  useEffect(() => {
    const el = holder.current;
    if (!el || !ready) return;
    const chart = labelledGroups(draw(ready, width));
    el.replaceChildren(...(chart ? [chart] : []));
    // Each drawing is an image named by the chart's title; the caption below says what it shows.
    for (const svg of topLevelSvgs(el)) {
      svg.setAttribute("role", "img");
      svg.setAttribute("aria-label", ready.title);
    }
    return () => el.replaceChildren();
  }, [ready, width, draw]);

  const download = () => {
    if (!holder.current || !ready) return;
    const svg = standaloneSvg(ready.title, topLevelSvgs(holder.current));
    if (!svg) return;
    const blob = new Blob([svg], { type: "image/svg+xml" });
    const link = document.createElement("a");
    link.href = URL.createObjectURL(blob);
    link.download = filename;
    link.click();
    URL.revokeObjectURL(link.href);
  };

  const failed = data && "error" in data && data.error ? data.error : null;
  return (
    <figure className="rounded-lg border border-loam-200 bg-white p-4" aria-busy={fetcher.state === "loading"}>
      <div className="mb-2 flex flex-wrap items-start justify-between gap-3">
        <h3 className="font-semibold">{ready?.title ?? "Chart"}</h3>
        {controls}
        <button
          type="button"
          onClick={download}
          disabled={!ready}
          className="no-print rounded border border-loam-400 px-2 py-1 text-xs hover:bg-loam-100 disabled:opacity-50"
        >
          Download SVG
        </button>
      </div>
      {fetcher.state === "loading" && !ready && <p className="py-10 text-center text-sm text-loam-600" role="status">Loading chart…</p>}
      {failed && <p className="py-6 text-sm text-brick-700" role="alert">This chart could not be drawn: {failed}</p>}
      <div ref={holder} className="w-full overflow-x-auto" data-chart={filename} />
      {ready && children?.(ready)}
      {ready && <figcaption className="mt-2 text-sm text-loam-700">{ready.caption}</figcaption>}
    </figure>
  );
}

/** The drawn SVGs (a chart, its legend ramp, side-by-side panels), not the ones nested inside them. */
function topLevelSvgs(root: Element): SVGSVGElement[] {
  return [...root.querySelectorAll("svg")].filter((svg) => !svg.parentElement?.closest("svg"));
}

/**
 * One SVG file for a chart made of several SVGs: the title on top, then each part below the last,
 * with Plot's class-scoped styles kept (they live in each SVG's own <style>).
 */
function standaloneSvg(title: string, parts: SVGSVGElement[]): string | null {
  if (parts.length === 0) return null;
  const titleHeight = 28;
  let y = titleHeight;
  let width = 0;
  const placed = parts.map((svg) => {
    const box = svg.getBoundingClientRect();
    const w = Number(svg.getAttribute("width")) || box.width;
    const h = Number(svg.getAttribute("height")) || box.height;
    const clone = svg.cloneNode(true) as SVGSVGElement;
    clone.setAttribute("x", "0");
    clone.setAttribute("y", String(y));
    clone.setAttribute("width", String(w));
    clone.setAttribute("height", String(h));
    y += h + 8;
    width = Math.max(width, w);
    return new XMLSerializer().serializeToString(clone);
  });
  const escaped = title.replace(/[&<>]/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;" })[c]!);
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${y}" viewBox="0 0 ${width} ${y}" font-family="IBM Plex Sans, system-ui, sans-serif">` +
    `<rect width="100%" height="100%" fill="white"/>` +
    `<text x="0" y="18" font-size="15" font-weight="600">${escaped}</text>${placed.join("")}</svg>`
  );
}
