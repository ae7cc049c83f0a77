#include "undertow/observe/prepare.hpp"

#include <cmath>

#include "undertow/detail/kernel.hpp"
#include "undertow/error.hpp"

namespace undertow::observe {

Prepared prepare(const io::SnapshotReader& rd, const ObservationSpec& spec,
                 const potential::Model& m, const SourcePlace& where) {
  const auto times = rd.times_myr();
  Prepared p;
  const auto k = rd.index_at(spec.time_myr);
  if (!k) throw InputError(where, rd.missing_time(spec.time_myr.value_or(NAN)));
  p.index = *k;
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
