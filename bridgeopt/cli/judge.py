"""``bridgeopt judge``: a proposed layout sized and set against the reference optimum."""

from __future__ import annotations

from bridgeopt import __version__
from bridgeopt.cli.common import EXIT_OK, check_json_target, format_inputs
from bridgeopt.errors import InputError
from bridgeopt.files.scenario import load_scenario

__all__ = ["add_judge"]

def run_judge(args) -> int:
    from bridgeopt.study.judge import judge_problem, judge_proposal
    from bridgeopt.files.proposal import read_proposal

    scenario = load_scenario(args.file)
    try:
        proposal = read_proposal(args.layout, args.members)
        judgement = judge_proposal(judge_problem(scenario), proposal)
    except InputError as err:
        if err.field.startswith(("nodes", "members", "layout")) or err.field.endswith("columns"):
            err.source = args.layout   # the layout's own fields: name its file, not the scenario's
        raise
    print(f"bridgeopt {__version__}: {scenario.name} ({scenario.kind} scenario): a proposed "
          "layout judged against the reference optimum")
    print(f"  source: {scenario.source}")
    print("\n".join(format_inputs(scenario)))
    print(judgement.summary(top=args.top))
    if args.json:
        from bridgeopt.files.design_json import design_to_dict, write_json

        data = design_to_dict(judgement.design, scenario=scenario)
        data.update({"reference_volume": judgement.reference_volume,
                     "volume_ratio": judgement.ratio, "proposal": judgement.proposal.source,
                     "excess": judgement.excess.to_dict(orient="records")})
        write_json(check_json_target(args.json, force=args.force), data)
        print(f"JSON written to {args.json}")
    return EXIT_OK


def add_judge(sub) -> None:
    """Add the ``judge`` command (a proposed layout against the reference optimum).

    Parameters
    ----------
    sub : argparse subparsers
        The command registry of the ``bridgeopt`` parser, to add ``judge`` to.
    """
    p = sub.add_parser("judge", help="size a proposed layout and compare it with the optimum",
                       description="Read a proposed layout (nodes and members, CSV or JSON; see "
                                   "docs/formats.md), size it with the same LP and self-weight "
                                   "elements under the scenario's loads, and report its volume, "
                                   "the reference optimum and the members carrying most of the "
                                   "excess.")
    p.add_argument("file", metavar="FILE.toml", help="scenario file (loads, supports, domain)")
    p.add_argument("layout", metavar="LAYOUT",
                   help="layout.json, or nodes.csv (with members.csv beside it), or a folder")
    p.add_argument("--members", metavar="MEMBERS.csv",
                   help="the members CSV (default: members.csv beside nodes.csv)")
    p.add_argument("--top", type=int, default=5, metavar="N",
                   help="members listed by excess (default 5)")
    p.add_argument("--json", metavar="OUT.json", help="also write the sized proposal as JSON")
    p.add_argument("--force", action="store_true",
                   help="replace an existing --json file even if bridgeopt did not write it")
    p.set_defaults(func=run_judge)
