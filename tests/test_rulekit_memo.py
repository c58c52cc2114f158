"""The rule helpers' memo: same answer as the plain call, computed once per distinct input."""

from linter.fixes import sink_design as plain_sink_design
from linter.rulekit import memoised, sink_design


def test_memoised_calls_once_per_distinct_arguments():
    calls = []

    def square(x, *, shift=0.0):
        calls.append(x)
        return x * x + shift

    fast = memoised(square)
    assert fast(3.0) == 9.0            # 3² (arithmetic)
    assert fast(3.0) == 9.0
    assert fast(3.0, shift=1.0) == 10.0
    assert fast(-0.0) == 0.0
    assert fast(0.0) == 0.0
    assert calls == [3.0, 3.0, -0.0, 0.0]   # -0.0 and 0.0 are told apart by repr


def test_memoised_sink_design_matches_the_plain_design():
    args = (11.4, 6.6, 0.02, 5.0)    # a 12 V rail less 5 %, two LEDs, 20 mA, 5 V reference (from memory)
    kwargs = dict(v_rail_max=12.6, vf_string_min=5.8, reference_name="+5V",
                  reference_tolerance=0.02, resistor_tolerance=0.01)
    assert sink_design(*args, **kwargs) == plain_sink_design(*args, **kwargs)
    assert sink_design(*args, **kwargs) is sink_design(*args, **kwargs)


def test_memoised_sink_search_matches_the_plain_search():
    from linter.fixes import sink_search as plain_sink_search
    from linter.rulekit import sink_search

    # 12 V ±10 % rail, two LEDs, 20 mA, 5 V ±2 % and ±5 % references (from memory); expected:
    # the plain call of our own code
    for tolerance in (0.02, 0.05):
        args = (1.5, 10.8, 6.8, 0.02, 5.0)
        kwargs = dict(v_rail_max=13.2, vf_string_min=5.8, reference_name="+5V",
                      reference_tolerance=tolerance, resistor_tolerance=0.05)
        assert sink_search(*args, **kwargs) == plain_sink_search(*args, **kwargs)
        assert sink_search(*args, **kwargs) is sink_search(*args, **kwargs)


def _board(groups):
    from types import SimpleNamespace

    return SimpleNamespace(groups=groups)


def _result(status, topology):
    from types import SimpleNamespace

    return SimpleNamespace(status=status, group=SimpleNamespace(topology=topology))


def test_solved_groups_kept_per_board_equal_the_plain_filter():
    from linter.rulekit import forget_board, solved_groups

    a, b, c = (_result("solved", "resistor"), _result("unsolved", "resistor"),
               _result("solved", "unrecognised"))
    first = _board((a, b, c))
    assert list(solved_groups(first)) == [a]
    assert list(solved_groups(first)) == [a]          # kept for the same board
    second = _board((c, a, a))
    assert list(solved_groups(second)) == [a, a]      # another board: its own groups
    changing = [a, b]
    board = _board(changing)
    assert list(solved_groups(board)) == [a]
    changing.append(a)                                # a list is never kept
    assert list(solved_groups(board)) == [a, a]
    forget_board()
    assert list(solved_groups(first)) == [a]
