"""Rules: chemistry knowledge, the rule catalogue, fixes, probes and the runner.

Model in, findings out.  Never imports deckward.server."""
