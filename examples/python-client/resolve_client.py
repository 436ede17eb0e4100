#!/usr/bin/env python3
"""Minimal client of the TaskPhrase service (`taskphrase serve`) for a robot stack.

Python 3 standard library only (urllib.request, json). Usage:

    python3 resolve_client.py "could you water the basil"          # one utterance
    python3 resolve_client.py "hall light" "feed the fish"          # a batch
    python3 resolve_client.py --health                              # service health
    python3 resolve_client.py --url http://127.0.0.1:5077 ...       # another address

Prints one line per utterance. Exit code: 0 when every utterance was accepted, 1 when any was
rejected or ambiguous, 2 when the service could not be reached or refused the request.

Acting on a resolution (what a robot stack should do):
  - outcome "accepted": switch to resolution["controller"] (manifold, latent_dims, decoder);
    if resolution["confirm"] is true, ask the user to confirm before the arm moves.
  - outcome "ambiguous": ask which of resolution["candidates"][0] / [1] was meant.
  - outcome "rejected": do not move; resolution["reason"] says why (out_of_scope, negated, ...).
A stop command must never go through this service: stop the arm on a direct path.
"""

import argparse
import json
import sys
import urllib.error
import urllib.request

DEFAULT_URL = "http://127.0.0.1:5077"


class ServiceError(Exception):
    """The service answered with an error body ({"status", "error", "message"}) or could not be reached."""


def _request(url, method="GET", body=None, timeout=10.0):
    data = None if body is None else json.dumps(body).encode("utf-8")
    request = urllib.request.Request(url, data=data, method=method)
    if data is not None:
        request.add_header("Content-Type", "application/json; charset=utf-8")
    request.add_header("Accept", "application/json")
    try:
        with urllib.request.urlopen(request, timeout=timeout) as response:
            return json.loads(response.read().decode("utf-8"))
    except urllib.error.HTTPError as e:
        try:
            error = json.loads(e.read().decode("utf-8"))
            raise ServiceError(f"{error.get('status', e.code)} {error.get('error')}: {error.get('message')}") from None
        except ValueError:
            raise ServiceError(f"HTTP {e.code} from {url}") from None
    except urllib.error.URLError as e:
        raise ServiceError(f"cannot reach {url}: {e.reason}") from None


def resolve(utterance, base_url=DEFAULT_URL, timeout=10.0):
    """Resolves one utterance; returns the resolution object (same keys as `taskphrase resolve --json`)."""
    return _request(f"{base_url}/v1/resolve", "POST", {"utterance": utterance}, timeout)


def resolve_many(utterances, base_url=DEFAULT_URL, timeout=30.0):
    """Resolves a batch (at most 256 by default); returns the resolutions in input order."""
    return _request(f"{base_url}/v1/resolve", "POST", {"utterances": list(utterances)}, timeout)["resolutions"]


def health(base_url=DEFAULT_URL, timeout=5.0):
    """Returns the service health: status, registry hash, model, uptime, last reload."""
    return _request(f"{base_url}/v1/health", timeout=timeout)


def describe(r):
    """One human-readable line for a resolution."""
    if r["outcome"] == "accepted":
        c = r["controller"]
        confirm = "  CONFIRM FIRST" if r["confirm"] else ""
        return f"accepted  {r['utterance']!r} -> {r['task']} ({c['manifold']}, {c['latent_dims']} axes){confirm}  score {r['score']:.3f}"
    if r["outcome"] == "ambiguous":
        a, b = r["candidates"][0]["task"], r["candidates"][1]["task"]
        return f"ambiguous {r['utterance']!r}: {a} or {b}?"
    return f"rejected  {r['utterance']!r}: {r['reason']}"


def main(argv=None):
    parser = argparse.ArgumentParser(description="Resolve utterances with a running TaskPhrase service.")
    parser.add_argument("utterances", nargs="*", help="utterances to resolve")
    parser.add_argument("--url", default=DEFAULT_URL, help=f"service address (default {DEFAULT_URL})")
    parser.add_argument("--health", action="store_true", help="print the service health and exit")
    parser.add_argument("--json", action="store_true", help="print the service's JSON objects, one per line")
    args = parser.parse_args(argv)
    base = args.url.rstrip("/")
    try:
        if args.health:
            print(json.dumps(health(base)))
            return 0
        if not args.utterances:
            parser.error("give at least one utterance (or --health)")
        results = [resolve(args.utterances[0], base)] if len(args.utterances) == 1 else resolve_many(args.utterances, base)
    except ServiceError as e:
        print(f"error: {e}", file=sys.stderr)
        return 2
    for r in results:
        print(json.dumps(r) if args.json else describe(r))
    return 0 if all(r["outcome"] == "accepted" for r in results) else 1


if __name__ == "__main__":
    sys.exit(main())
