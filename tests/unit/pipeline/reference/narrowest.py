"""Reference narrowest stroke, from a general image library's skeleton and distance transform.

Reads JSON from stdin: [{"width": w, "height": h, "ink": "<base64 of w*h bytes, 1 = ink>"}, ...]
Writes JSON to stdout: for each bitmap, {"widthPx": narrowest width in pixels or null, "at":
{"x", "y"} where it was found, "skeletonPixels": n, "bodyPixels": n}.

The skeleton is scikit-image's skimage.morphology.medial_axis, the distances
scipy.ndimage.distance_transform_edt (both on the bitmap inside a one-pixel paper border, so
that outside the image counts as paper). The stroke bodies, end tapers and the narrowest
width follow the definitions in server/pipeline/skeleton.ts and geometry.ts, written again here
independently on top of that skeleton and those distances.
"""
import base64
import heapq
import json
import math
import sys

import numpy as np
from scipy import ndimage as ndi
from skimage.morphology import medial_axis

TAPER_RATIO = 4.0
RISE_TOLERANCE_PX = 1.0
NEIGHBOURS = [(-1, -1), (-1, 0), (-1, 1), (0, -1), (0, 1), (1, -1), (1, 0), (1, 1)]


def fill_pinholes(ink):
    # a paper pixel whose four edge neighbours are ink counts as ink (as in skeleton.ts)
    p = np.pad(ink, 1)
    edges = p[:-2, 1:-1] & p[2:, 1:-1] & p[1:-1, :-2] & p[1:-1, 2:]
    return ink | edges


def narrowest(ink):
    padded = np.pad(fill_pinholes(ink), 1)
    if not padded.any():
        return {"widthPx": None, "skeletonPixels": 0, "bodyPixels": 0}
    distance = ndi.distance_transform_edt(padded)
    skeleton = medial_axis(padded, random_state=0)
    pixels = [tuple(p) for p in np.argwhere(skeleton)]
    index = {p: i for i, p in enumerate(pixels)}
    depth = [float(distance[p]) for p in pixels]
    neighbours = []
    for (y, x) in pixels:
        neighbours.append([index[(y + dy, x + dx)] for dy, dx in NEIGHBOURS if (y + dy, x + dx) in index])

    # end tapers: paths from the skeleton's ends along which the distance to the paper keeps
    # within the tolerance of its largest value so far
    way = [math.inf] * len(pixels)
    rise = [0.0] * len(pixels)
    heap = []
    for i, n in enumerate(neighbours):
        if len(n) <= 1:
            way[i] = 0.0
            rise[i] = depth[i]
            heap.append((0.0, i))
    heapq.heapify(heap)
    while heap:
        d, a = heapq.heappop(heap)
        if d > way[a]:
            continue
        ya, xa = pixels[a]
        for b in neighbours[a]:
            if depth[b] < rise[a] - RISE_TOLERANCE_PX:
                continue
            yb, xb = pixels[b]
            step = math.hypot(yb - ya, xb - xa)
            if d + step < way[b]:
                way[b] = d + step
                rise[b] = max(rise[a], depth[b])
                heapq.heappush(heap, (d + step, b))
    body = [way[i] >= TAPER_RATIO * depth[i] for i in range(len(pixels))]

    labels, count = ndi.label(skeleton, structure=np.ones((3, 3)))
    best, at = math.inf, None
    for piece in range(1, count + 1):
        members = [i for i, p in enumerate(pixels) if labels[p] == piece]
        stroke = [i for i in members if body[i]]
        # a stroke: 2D - 0.5 at its thinnest body pixel; a compact piece: 2D + 0.5 at its deepest
        if stroke:
            i = min(stroke, key=lambda j: depth[j])
            width = 2 * depth[i] - 0.5
        else:
            i = max(members, key=lambda j: depth[j])
            width = 2 * depth[i] + 0.5
        if width < best:
            best, at = width, i
    y, x = pixels[at]
    return {"widthPx": best, "at": {"x": int(x) - 1, "y": int(y) - 1}, "skeletonPixels": len(pixels), "bodyPixels": sum(body)}


def main():
    out = []
    for item in json.load(sys.stdin):
        w, h = item["width"], item["height"]
        ink = np.frombuffer(base64.b64decode(item["ink"]), dtype=np.uint8).reshape(h, w) > 0
        out.append(narrowest(ink))
    json.dump(out, sys.stdout)


main()
