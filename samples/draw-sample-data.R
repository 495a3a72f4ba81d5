# Draws the invented data of the samples in this folder (none of it is a real measurement).
# Run: Rscript samples/draw-sample-data.R   (written with R 4.2.2; set.seed values below)
# It prints each runs table; the printed tables were pasted into the .trial files as plain text.
# R's sample() gives the randomized run order; it is not the Trialbook run-sheet randomizer, so
# the `plan seed` in a sample is only the seed that sample would use if re-planned in Trialbook.
# Edited by hand after drawing, so that the demo samples show only the warnings they are meant to:
# two-factor.trial r14 warp 0.21 -> 0.31 and incomplete.trial r07 rub 193 -> 219 (each drew a
# studentized residual beyond the Bonferroni outlier bound); one-way.trial `detect gloss` 2.0 -> 5.0.

align <- function(cols, pipe_before, trailer = NULL) {
  # cols: named list of character vectors (first is `id`); pipe_before: name of first response column.
  header <- names(cols)
  w <- sapply(seq_along(cols), function(j) max(nchar(c(header[j], cols[[j]]), type = "chars")))
  line <- function(cells) {
    out <- ""
    for (j in seq_along(cells)) {
      gap <- if (j == 1) "" else if (header[j] == pipe_before) " | " else "  "
      out <- paste0(out, gap, formatC(cells[j], width = -w[j]))
    }
    out
  }
  lines <- c(paste0("runs  ", line(header)))
  n <- length(cols[[1]])
  for (i in seq_len(n)) {
    row <- paste0("      ", line(sapply(cols, function(v) v[i])))
    if (!is.null(trailer) && nzchar(trailer[i])) row <- paste0(row, "  ", trailer[i])
    lines <- c(lines, sub(" +$", "", row))
  }
  cat(lines, sep = "\n"); cat("\n")
}
ids <- function(n) sprintf("r%02d", seq_len(n))

cat("## one-way.trial\n")
set.seed(2611)
additive <- rep(c("control", "acrylic", "silicone", "\"wax blend\""), each = 5)
mu <- c(control = 84.0, acrylic = 86.5, silicone = 89.0, "\"wax blend\"" = 81.5)
gloss <- mu[additive] + rnorm(20, 0, 1.6)
o <- sample(20)
align(list(id = ids(20), additive = additive[o], gloss = sprintf("%.1f", gloss[o])), "gloss")

cat("## two-factor.trial\n")
set.seed(3907)
cells <- expand.grid(temp = c("40", "60", "80"), resin = c("virgin", "regrind"), rep = 1:3,
                     stringsAsFactors = FALSE)
ms <- c("40.virgin" = 0.95, "60.virgin" = 1.02, "80.virgin" = 1.10,
        "40.regrind" = 0.98, "60.regrind" = 1.12, "80.regrind" = 1.38)
mw <- c("40.virgin" = 0.22, "60.virgin" = 0.26, "80.virgin" = 0.31,
        "40.regrind" = 0.25, "60.regrind" = 0.33, "80.regrind" = 0.48)
key <- paste(cells$temp, cells$resin, sep = ".")
shrink <- ms[key] + rnorm(18, 0, 0.04)
warp <- mw[key] + rnorm(18, 0, 0.04)
o <- sample(18)
align(list(id = ids(18), resin = cells$resin[o], "mold-temp" = cells$temp[o],
           shrink = sprintf("%.2f", shrink[o]), warp = sprintf("%.2f", warp[o])), "shrink")

cat("## blocked.trial\n")
set.seed(5150)
slurries <- c("silica", "ceria", "alumina", "hybrid")
ms <- c(silica = 210, ceria = 232, alumina = 198, hybrid = 240)
lots <- sample(paste0("L", 1:5))            # lots polished in a random order
lot_eff <- c(L1 = -12, L2 = 5, L3 = 14, L4 = -6, L5 = -1)
slurry <- unlist(lapply(lots, function(l) sample(slurries)))   # random order within each lot
lot <- rep(lots, each = 4)
removal <- round(ms[slurry] + lot_eff[lot] + rnorm(20, 0, 6))
align(list(id = ids(20), slurry = slurry, lot = lot, removal = as.character(removal)), "removal")

cat("## covariate.trial\n")
set.seed(7741)
gun <- rep(c("low-kv", "mid-kv", "high-kv"), times = c(6, 7, 5))
humidity <- sample(38:62, 18, replace = TRUE)
mg <- c("low-kv" = 64, "mid-kv" = 70, "high-kv" = 74)
thickness <- mg[gun] + 0.6 * (humidity - 50) + rnorm(18, 0, 2)
o <- sample(18)
th <- sprintf("%.1f", thickness[o])
trailer <- rep("", 18)
bad <- 11                                        # this run's gun tip clogged: thin, uneven film
th[bad] <- sprintf("%.1f", thickness[o][bad] - 17)
trailer[bad] <- "excluded \"gun tip clogged during the pass\""
align(list(id = ids(18), gun = gun[o], humidity = as.character(humidity[o]), thickness = th),
      "thickness", trailer)

cat("## incomplete.trial\n")
set.seed(8823)
dwell <- rep(c("short", "standard", "long"), times = c(4, 3, 4))   # one standard run never made
mr <- c(short = 170, standard = 230, long = 262)
md <- c(short = 0.8, standard = 1.0, long = 1.6)
rub <- round(mr[dwell] + rnorm(11, 0, 14))
de <- md[dwell] + rnorm(11, 0, 0.15)
o <- sample(11)
rub <- as.character(rub[o]); de <- sprintf("%.2f", de[o])
de[9] <- "?"                                     # colour reading not yet taken
rub[10:11] <- "?"; de[10:11] <- "?"             # the last two runs are not made yet
trailer <- c(rep("", 8), "# colorimeter out for calibration", "# pending", "# pending")
align(list(id = ids(11), dwell = dwell[o], rub = rub, "delta-e" = de), "rub", trailer)
