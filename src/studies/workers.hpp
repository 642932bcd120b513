#pragma once
// A fixed set of threads that runs one indexed loop after another: the ranking runs thousands of
// short batches on a large catalog, each too short to pay for starting threads.

#include <atomic>
#include <condition_variable>
#include <cstddef>
#include <cstdint>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>
#include <vector>

namespace coilsieve::studies {

class Workers {
public:
    // `threads` in all, the calling thread included (1: everything runs on the caller).
    explicit Workers(unsigned threads);
    Workers(const Workers&) = delete;
    Workers& operator=(const Workers&) = delete;
    ~Workers();

    // fn(i) for every i in [0, n), in any order and on any of the threads; returns when all are
    // done. The first exception is rethrown then (the rest of the loop is skipped).
    void run(std::size_t n, const std::function<void(std::size_t)>& fn);
    // The same, with the calling thread running `first()` before it joins the loop (before the
    // loop with one thread): work of its own that the loop must not depend on.
    void run(std::size_t n, const std::function<void(std::size_t)>& fn,
             const std::function<void()>& first);

private:
    void work();
    void serve();

    std::mutex m_;
    std::condition_variable wake_, done_;
    const std::function<void(std::size_t)>* fn_ = nullptr;
    std::size_t n_ = 0;
    std::atomic<std::size_t> next_{0};
    std::size_t busy_ = 0;
    std::uint64_t round_ = 0;
    bool stop_ = false;
    std::exception_ptr error_;
    std::vector<std::jthread> pool_; // last, so it joins before the rest goes
};

} // namespace coilsieve::studies
