// Thinning dense scatter for drawing: above a limit, points are binned on a
// grid of about screen resolution over the data range and one point per
// occupied bin is kept (the picture is the same at plot size); points the
// caller marks as kept (flagged rows) are always drawn.
#pragma once

#include <cstddef>
#include <functional>
#include <vector>

namespace moderato::ui {

// Indices of the points to draw, ascending. Below `limit` points: all of
// them. NaN coordinates are left out.
std::vector<std::size_t> thinScatter(const std::vector<double>& x, const std::vector<double>& y,
                                     std::size_t limit = 20000, int binsX = 600, int binsY = 400,
                                     const std::function<bool(std::size_t)>& keep = {});

}  // namespace moderato::ui
