"""Money: incentive programs as data, costs over time, and household finance.

Modules
-------
incentives  incentive programs (records parsed from YAML-like dicts) and their evaluation
costs       base costs (ranges or quotes, sized), inflation, Wright's-law learning, fuel prices
finance     loans, NPV, IRR, payback, yearly household cash flows, levelised cost of energy
prices      a yearly random model of energy prices from a historic table, sampled price paths,
            bill shocks and conditional value at risk

Everything here is a pure function or a small frozen dataclass; amounts are USD.
"""

__all__: list[str] = []
