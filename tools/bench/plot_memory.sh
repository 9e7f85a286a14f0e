#!/usr/bin/env bash
# plot_memory.sh CSV > SVG: rigcald's resident memory (MiB) and cumulative CPU seconds over time
# from the back-pressure run's samples (t_s,cpu_s,rss_kib), as a small self-contained SVG.
set -euo pipefail
awk -F, '
BEGIN { n = 0 }
NR == 1 { next }
{ t[n] = $1; c[n] = $2; r[n] = $3 / 1024; n++; if ($1 > tmax) tmax = $1; if ($2 > cmax) cmax = $2; if ($3 / 1024 > rmax) rmax = $3 / 1024 }
END {
  W = 640; H = 320; L = 60; R = 60; T = 30; B = 40; pw = W - L - R; ph = H - T - B
  if (tmax <= 0) tmax = 1; if (cmax <= 0) cmax = 1
  rtop = rmax * 1.25; if (rtop <= 0) rtop = 1
  printf "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" height=\"%d\" font-family=\"sans-serif\" font-size=\"11\">\n", W, H
  printf "<rect width=\"100%%\" height=\"100%%\" fill=\"white\"/>\n"
  printf "<text x=\"%d\" y=\"18\" font-size=\"13\">rigcald under an unpaced sender: resident memory and CPU time</text>\n", L
  printf "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\" fill=\"none\" stroke=\"#888\"/>\n", L, T, pw, ph
  for (k = 0; k <= 4; k++) {
    y = T + ph - k * ph / 4
    printf "<line x1=\"%d\" x2=\"%d\" y1=\"%.1f\" y2=\"%.1f\" stroke=\"#eee\"/>\n", L, L + pw, y, y
    printf "<text x=\"%d\" y=\"%.1f\" text-anchor=\"end\" fill=\"#1f5fa8\">%.1f</text>\n", L - 4, y + 4, k * rtop / 4
    printf "<text x=\"%d\" y=\"%.1f\" fill=\"#b5522b\">%.1f</text>\n", L + pw + 4, y + 4, k * cmax / 4
    x = L + k * pw / 4
    printf "<text x=\"%.1f\" y=\"%d\" text-anchor=\"middle\">%.0f</text>\n", x, T + ph + 14, k * tmax / 4
  }
  printf "<text x=\"%d\" y=\"%d\" text-anchor=\"middle\">time since the sender started (s)</text>\n", L + pw / 2, H - 8
  printf "<text x=\"14\" y=\"%d\" fill=\"#1f5fa8\" transform=\"rotate(-90 14 %d)\" text-anchor=\"middle\">VmRSS (MiB)</text>\n", T + ph / 2, T + ph / 2
  printf "<text x=\"%d\" y=\"%d\" fill=\"#b5522b\" transform=\"rotate(90 %d %d)\" text-anchor=\"middle\">CPU user+sys (s)</text>\n", W - 12, T + ph / 2, W - 12, T + ph / 2
  printf "<polyline fill=\"none\" stroke=\"#1f5fa8\" stroke-width=\"2\" points=\""
  for (i = 0; i < n; i++) printf "%.1f,%.1f ", L + t[i] / tmax * pw, T + ph - r[i] / rtop * ph
  printf "\"/>\n<polyline fill=\"none\" stroke=\"#b5522b\" stroke-width=\"1.5\" stroke-dasharray=\"4 3\" points=\""
  for (i = 0; i < n; i++) printf "%.1f,%.1f ", L + t[i] / tmax * pw, T + ph - c[i] / cmax * ph
  printf "\"/>\n"
  printf "<line x1=\"%d\" x2=\"%d\" y1=\"%d\" y2=\"%d\" stroke=\"#1f5fa8\" stroke-width=\"2\"/>", L + 10, L + 30, T + 14, T + 14
  printf "<text x=\"%d\" y=\"%d\">VmRSS</text>\n", L + 36, T + 18
  printf "<line x1=\"%d\" x2=\"%d\" y1=\"%d\" y2=\"%d\" stroke=\"#b5522b\" stroke-width=\"1.5\" stroke-dasharray=\"4 3\"/>", L + 90, L + 110, T + 14, T + 14
  printf "<text x=\"%d\" y=\"%d\">CPU time (cumulative)</text>\n", L + 116, T + 18
  printf "</svg>\n"
}' "$1"
