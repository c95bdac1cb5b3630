// Charts leave the app as files drawn in the browser, without the network: SVG by serialising the
// chart's own <svg> element, PNG by drawing that SVG onto a canvas.

const SVG_NS = "http://www.w3.org/2000/svg";
const FONT = '"Inter Tight", system-ui, sans-serif';
/** Pixels per SVG unit in the PNG: sharp enough for a slide or a printed page. */
const PNG_SCALE = 2;

/** A standalone SVG document of the element: namespace, size, white paper and the font named on the root. */
export function svgDocument(svg: SVGSVGElement): { markup: string; width: number; height: number } {
  const box = svg.getBoundingClientRect();
  const width = Math.round(Number(svg.getAttribute("width")) || box.width);
  const height = Math.round(Number(svg.getAttribute("height")) || box.height);
  const copy = svg.cloneNode(true) as SVGSVGElement;
  copy.setAttribute("xmlns", SVG_NS);
  copy.setAttribute("width", String(width));
  copy.setAttribute("height", String(height));
  if (!copy.getAttribute("viewBox")) copy.setAttribute("viewBox", `0 0 ${width} ${height}`);
  copy.style.fontFamily = FONT;
  copy.removeAttribute("class");
  // Without a background the file shows through to whatever it is placed on.
  const paper = document.createElementNS(SVG_NS, "rect");
  paper.setAttribute("width", "100%");
  paper.setAttribute("height", "100%");
  paper.setAttribute("fill", "#ffffff");
  copy.insertBefore(paper, copy.firstChild);
  const markup = `<?xml version="1.0" encoding="UTF-8"?>\n${new XMLSerializer().serializeToString(copy)}`;
  return { markup, width, height };
}

function saveBlob(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement("a");
  link.href = url;
  link.download = fileName;
  link.rel = "noopener";
  document.body.appendChild(link);
  link.click();
  link.remove();
  // Give the browser time to start the download before the address is released.
  window.setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function downloadSvg(svg: SVGSVGElement, baseName: string): void {
  const { markup } = svgDocument(svg);
  saveBlob(new Blob([markup], { type: "image/svg+xml;charset=utf-8" }), `${baseName}.svg`);
}

export async function downloadPng(svg: SVGSVGElement, baseName: string): Promise<void> {
  const { markup, width, height } = svgDocument(svg);
  const url = URL.createObjectURL(new Blob([markup], { type: "image/svg+xml;charset=utf-8" }));
  try {
    const image = new Image();
    image.width = width;
    image.height = height;
    image.src = url;
    await image.decode();
    const canvas = document.createElement("canvas");
    canvas.width = width * PNG_SCALE;
    canvas.height = height * PNG_SCALE;
    const context = canvas.getContext("2d");
    if (!context) throw new Error("This browser cannot draw the picture (no canvas).");
    context.fillStyle = "#ffffff";
    context.fillRect(0, 0, canvas.width, canvas.height);
    context.scale(PNG_SCALE, PNG_SCALE);
    context.drawImage(image, 0, 0, width, height);
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, "image/png"));
    if (!blob) throw new Error("This browser could not turn the chart into a PNG.");
    saveBlob(blob, `${baseName}.png`);
  } finally {
    URL.revokeObjectURL(url);
  }
}
