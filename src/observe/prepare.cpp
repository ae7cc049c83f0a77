#include "undertow/observe/prepare.hpp"

#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::observe {

Prepared prepare(const io::SnapshotReader& rd, const ObservationSpec& spec,
                 const potential::Model& m, const SourcePlace& where) {
  const auto times = rd.times_myr();
  Prepared p;
  p.index = times.size() - 1;
  if (spec.time_myr) {
    p.index = times.size();
    for (std::size_t i = 0; i < times.size(); ++i)
      if (std::fabs(times[i] - *spec.time_myr) < 1e-9 * (1 + std::fabs(times[i]))) p.index = i;
    if (p.index == times.size()) {
      std::string list;
      for (double t : times)
        list += (list.empty() ? "" : ", ") + detail::num(t);
      throw InputError(where, "no snapshot at " + detail::num(*spec.time_myr) + " Myr in " +
                                  rd.path() + " (times: " + list + ")");
    }
  }
  p.time_myr = times[p.index];
  const auto& young = spec.settings.young;
  for (std::size_t i = 0; i <= p.index; ++i)
    if (i == p.index ||
        (young && !young->star_age_myr && times[i] >= p.time_myr - young->age_window_myr - 1e-9))
      p.window.push_back(rd.read(i));
  if (young) p.weights = young_weights(m, p.window, *young);
  return p;
}

} // namespace undertow::observe
