#include "wire/capacity_proto.h"

#include <bit>
#include <cmath>

#include "absl/strings/str_cat.h"

namespace sliceplan {
namespace {

absl::Status Bad(const std::string& field, const std::string& why) {
  return absl::InvalidArgumentError(absl::StrCat("capacity reply: ", field, ": ", why));
}

bool FiniteAtLeastZero(double v) { return std::isfinite(v) && v >= 0; }
bool Rate(double v) { return std::isfinite(v) && v > 0 && v < 1; }

// 0 on the wire is "none".
std::optional<int> Workers(uint32_t w) {
  if (w == 0) return std::nullopt;
  return static_cast<int>(w);
}

}  // namespace

v1::CapacityResponse CapacityToProto(const CapacityTable& table) {
  v1::CapacityResponse m;
  for (const CapacityRow& r : table.rows) {
    v1::CapacityRow* row = m.add_rows();
    row->set_workers(static_cast<uint32_t>(r.workers));
    row->set_slices(r.slices);
    row->set_seconds(r.seconds);
    row->set_memo_bytes(r.memo_bytes);
    row->set_fits_memo(r.fits_memo);
  }
  m.set_enough_workers(static_cast<uint32_t>(table.enough_workers.value_or(0)));
  m.set_auto_exact_workers(static_cast<uint32_t>(table.auto_exact_workers.value_or(0)));
  m.set_summary(table.summary);
  m.set_seconds_per_split(table.rates.dense_split_seconds);
  m.set_seconds_per_connected_set(table.rates.connected_set_seconds);
  m.set_slice_overhead_seconds(table.rates.slice_overhead_seconds);
  m.set_estimated(table.estimated);
  m.set_threads_per_worker(static_cast<uint32_t>(table.threads_per_worker));
  m.set_deadline_seconds(table.deadline_seconds);
  return m;
}

absl::StatusOr<CapacityTable> CapacityFromProto(const v1::CapacityResponse& m) {
  CapacityTable t;
  if (m.rows_size() > 11) return Bad("rows", "more than the 11 pools of 1 to 1,024 workers");
  for (int i = 0; i < m.rows_size(); ++i) {
    const v1::CapacityRow& r = m.rows(i);
    const std::string field = absl::StrCat("rows[", i, "]");
    if (r.workers() != (1u << i)) return Bad(field + ".workers", "not 2^" + std::to_string(i));
    if (!std::has_single_bit(r.slices())) return Bad(field + ".slices", "not a power of two");
    if (!FiniteAtLeastZero(r.seconds())) return Bad(field + ".seconds", "not finite and >= 0");
    if (!FiniteAtLeastZero(r.memo_bytes()))
      return Bad(field + ".memo_bytes", "not finite and >= 0");
    t.rows.push_back(
        {static_cast<int>(r.workers()), r.slices(), r.seconds(), r.memo_bytes(), r.fits_memo()});
  }
  for (uint32_t w : {m.enough_workers(), m.auto_exact_workers()}) {
    if (w != 0 && (!std::has_single_bit(w) || w > static_cast<uint32_t>(kCapacityMaxWorkers))) {
      return Bad("enough_workers", "not a pool of the table");
    }
  }
  t.enough_workers = Workers(m.enough_workers());
  t.auto_exact_workers = Workers(m.auto_exact_workers());
  if (!Rate(m.seconds_per_split()) || !Rate(m.seconds_per_connected_set()) ||
      !FiniteAtLeastZero(m.slice_overhead_seconds())) {
    return Bad("rates", "not finite and > 0");
  }
  t.rates = {m.seconds_per_split(), m.seconds_per_connected_set(), m.slice_overhead_seconds()};
  if (m.threads_per_worker() < 1 || m.threads_per_worker() > kCapacityMaxThreads) {
    return Bad("threads_per_worker", "outside 1.." + std::to_string(kCapacityMaxThreads));
  }
  t.threads_per_worker = static_cast<int>(m.threads_per_worker());
  if (!(std::isfinite(m.deadline_seconds()) && m.deadline_seconds() > 0)) {
    return Bad("deadline_seconds", "not finite and > 0");
  }
  t.deadline_seconds = m.deadline_seconds();
  t.estimated = m.estimated();
  t.summary = m.summary();
  return t;
}

}  // namespace sliceplan
