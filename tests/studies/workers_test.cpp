// The thread set the ranking runs its batches on: every index exactly once, round after round,
// the caller's own work once per round on the calling thread, and an exception reaches the caller
// without stopping the set.
#include "studies/workers.hpp"

#include <gtest/gtest.h>
#include <stdexcept>
#include <thread>
#include <vector>

using coilsieve::studies::Workers;

TEST(Workers, EveryIndexRunsOnceInEveryRound) {
    for (unsigned threads : {1u, 2u, 3u}) {
        Workers w(threads);
        for (std::size_t round = 0; round < 500; ++round) {
            const std::size_t n = round % 70;
            std::vector<int> hits(n, 0);
            w.run(n, [&](std::size_t i) { ++hits[i]; }); // distinct slots: no race
            for (std::size_t i = 0; i < n; ++i)
                ASSERT_EQ(hits[i], 1) << "index " << i << " of " << n << ", round " << round << ", "
                                      << threads << " threads";
        }
    }
}

TEST(Workers, AnExceptionReachesTheCallerAndTheSetRunsOn) {
    Workers w(2);
    EXPECT_THROW(w.run(100,
                       [](std::size_t i) {
                           if (i == 37) throw std::runtime_error("index 37");
                       }),
                 std::runtime_error);
    std::vector<int> hits(50, 0);
    w.run(hits.size(), [&](std::size_t i) { ++hits[i]; });
    for (int h : hits) EXPECT_EQ(h, 1);
}

TEST(Workers, TheCallersOwnWorkRunsOnceOnItsThreadBesideTheLoop) {
    for (unsigned threads : {1u, 2u}) {
        Workers w(threads);
        for (std::size_t n : {0u, 1u, 2u, 64u}) {
            std::vector<int> hits(n, 0);
            int own = 0;
            std::thread::id where;
            w.run(
                n, [&](std::size_t i) { ++hits[i]; },
                [&] {
                    ++own;
                    where = std::this_thread::get_id();
                });
            EXPECT_EQ(own, 1) << n << " indices, " << threads << " threads";
            EXPECT_EQ(where, std::this_thread::get_id());
            for (int h : hits) EXPECT_EQ(h, 1);
        }
    }
    Workers w(2);
    std::vector<int> hits(40, 0);
    EXPECT_THROW(w.run(
                     hits.size(), [&](std::size_t i) { ++hits[i]; },
                     [] { throw std::runtime_error("own work"); }),
                 std::runtime_error);
    w.run(hits.size(), [&](std::size_t i) { hits[i] = 1; });
    for (int h : hits) EXPECT_EQ(h, 1);
}
