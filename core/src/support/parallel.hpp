// Deterministic block parallelism: work is cut into fixed blocks whose
// boundaries do not depend on the thread count; blocks are mapped in
// parallel and their results reduced in block order, so the numbers are
// identical whatever the number of threads.
#pragma once

#include <algorithm>
#include <atomic>
#include <cstddef>
#include <exception>
#include <mutex>
#include <optional>
#include <thread>
#include <vector>

namespace moderato::detail {

inline unsigned resolve_threads(unsigned requested) {
    if (requested > 0) return requested;
    const unsigned hw = std::thread::hardware_concurrency();
    return hw > 0 ? hw : 1;
}

// Calls fn(i) for every i in [0, count) on up to `threads` threads.
template <class Fn>
void parallel_for(std::size_t count, unsigned threads, Fn&& fn) {
    threads = std::min<unsigned>(resolve_threads(threads), static_cast<unsigned>(std::max<std::size_t>(count, 1)));
    if (threads <= 1) {
        for (std::size_t i = 0; i < count; ++i) fn(i);
        return;
    }
    std::atomic<std::size_t> next{0};
    std::exception_ptr error;
    std::mutex error_mutex;
    auto worker = [&] {
        for (std::size_t i; (i = next.fetch_add(1)) < count;) {
            try {
                fn(i);
            } catch (...) {
                std::lock_guard lock(error_mutex);
                if (!error) error = std::current_exception();
                next = count;
            }
        }
    };
    std::vector<std::thread> pool;
    for (unsigned t = 1; t < threads; ++t) pool.emplace_back(worker);
    worker();
    for (auto& t : pool) t.join();
    if (error) std::rethrow_exception(error);
}

// Maps blocks [0, count) in parallel, in waves, and feeds each result to
// reduce(block, result) in block order.
template <class Result, class Map, class Reduce>
void map_reduce_ordered(std::size_t count, unsigned threads, Map&& map, Reduce&& reduce) {
    const std::size_t wave = std::max<std::size_t>(8 * resolve_threads(threads), 1);
    std::vector<std::optional<Result>> results;
    for (std::size_t start = 0; start < count; start += wave) {
        const std::size_t len = std::min(wave, count - start);
        results.assign(len, std::nullopt);
        parallel_for(len, threads, [&](std::size_t i) { results[i].emplace(map(start + i)); });
        for (std::size_t i = 0; i < len; ++i) reduce(start + i, std::move(*results[i]));
    }
}

}  // namespace moderato::detail
