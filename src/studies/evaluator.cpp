// The physics the ranking uses by default, kept in its own file so that tests with a synthetic
// evaluator do not need the converter.
#include "studies/rank.hpp"

namespace coilsieve::studies {

PairEvaluatorFn default_evaluator() {
    return [](const design::Design& d, const parts::Inductor& l, const parts::Diode& diode) {
        return optimisation::PairEvaluator(
            [&d, &l, &diode,
             prepared = converter::prepare_pair(d, l, diode)](const converter::Setting& s) {
                return converter::evaluate_pair(d, l, diode, prepared, s);
            });
    };
}

} // namespace coilsieve::studies
