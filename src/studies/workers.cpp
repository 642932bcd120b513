#include "studies/workers.hpp"

#include <utility>

namespace coilsieve::studies {

Workers::Workers(unsigned threads) {
    for (unsigned k = 1; k < threads; ++k) pool_.emplace_back([this] { serve(); });
}

Workers::~Workers() {
    {
        std::lock_guard lock(m_);
        stop_ = true;
    }
    wake_.notify_all();
}

void Workers::run(std::size_t n, const std::function<void(std::size_t)>& fn) {
    run(n, fn, [] {});
}

void Workers::run(std::size_t n, const std::function<void(std::size_t)>& fn,
                  const std::function<void()>& first) {
    if (pool_.empty() || n < 1) {
        first();
        for (std::size_t i = 0; i < n; ++i) fn(i);
        return;
    }
    {
        std::lock_guard lock(m_);
        fn_ = &fn;
        n_ = n;
        next_ = 0;
        busy_ = pool_.size();
        error_ = nullptr;
        ++round_;
    }
    wake_.notify_all();
    try {
        first();
    } catch (...) {
        std::lock_guard lock(m_);
        if (!error_) error_ = std::current_exception();
        next_ = n_;
    }
    work();
    std::unique_lock lock(m_);
    done_.wait(lock, [&] { return busy_ == 0; });
    fn_ = nullptr;
    if (error_) std::rethrow_exception(std::exchange(error_, nullptr));
}

void Workers::work() {
    for (std::size_t i = next_++; i < n_; i = next_++) {
        try {
            (*fn_)(i);
        } catch (...) {
            std::lock_guard lock(m_);
            if (!error_) error_ = std::current_exception();
            next_ = n_;
        }
    }
}

void Workers::serve() {
    std::uint64_t seen = 0;
    for (;;) {
        {
            std::unique_lock lock(m_);
            wake_.wait(lock, [&] { return stop_ || round_ != seen; });
            if (stop_) return;
            seen = round_;
        }
        work();
        std::lock_guard lock(m_);
        if (--busy_ == 0) done_.notify_one();
    }
}

} // namespace coilsieve::studies
