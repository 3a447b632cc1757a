"""Grammar: the deck language's parser and resolved model.

Text in, model out.  Never imports deckward.rules or deckward.server.
"""
