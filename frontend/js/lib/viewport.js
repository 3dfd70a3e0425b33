// World (section coordinates, y up) to screen (pixels, y down) transform with zoom and pan.
// A view is {scale, tx, ty}: screen = (x * scale + tx, -y * scale + ty).

/** Bounding box {x0, y0, x1, y1} of many point lists. */
export function boundsOf(pointLists) {
  let [x0, y0, x1, y1] = [Infinity, Infinity, -Infinity, -Infinity];
  for (const list of pointLists) {
    for (const [x, y] of list) {
      x0 = Math.min(x0, x); y0 = Math.min(y0, y);
      x1 = Math.max(x1, x); y1 = Math.max(y1, y);
    }
  }
  return { x0, y0, x1, y1 };
}

/** The view that fits `box` into a width × height screen with `margin` pixels around. */
export function fitView(box, width, height, margin = 24) {
  const bw = Math.max(box.x1 - box.x0, 1e-12);
  const bh = Math.max(box.y1 - box.y0, 1e-12);
  const scale = Math.min((width - 2 * margin) / bw, (height - 2 * margin) / bh);
  const cx = (box.x0 + box.x1) / 2;
  const cy = (box.y0 + box.y1) / 2;
  return { scale, tx: width / 2 - cx * scale, ty: height / 2 + cy * scale };
}

export function toScreen(view, x, y) {
  return [x * view.scale + view.tx, -y * view.scale + view.ty];
}

export function toWorld(view, sx, sy) {
  return [(sx - view.tx) / view.scale, -(sy - view.ty) / view.scale];
}

/** Zoom by `factor` keeping the screen point (sx, sy) fixed. */
export function zoomAt(view, factor, sx, sy) {
  const [wx, wy] = toWorld(view, sx, sy);
  const scale = view.scale * factor;
  return { scale, tx: sx - wx * scale, ty: sy + wy * scale };
}

/** Move the picture by (dx, dy) pixels. */
export function panBy(view, dx, dy) {
  return { scale: view.scale, tx: view.tx + dx, ty: view.ty + dy };
}

/** SVG path data of a closed ring (screen coordinates). */
export function ringPath(view, ring) {
  return ring
    .map(([x, y], i) => {
      const [sx, sy] = toScreen(view, x, y);
      return `${i ? "L" : "M"}${sx.toFixed(2)} ${sy.toFixed(2)}`;
    })
    .join("") + "Z";
}

/** SVG path data of an open polyline (screen coordinates). */
export function linePath(view, line) {
  return line
    .map(([x, y], i) => {
      const [sx, sy] = toScreen(view, x, y);
      return `${i ? "L" : "M"}${sx.toFixed(2)} ${sy.toFixed(2)}`;
    })
    .join("");
}
