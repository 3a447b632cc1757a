def threshold(symbol):
    return 0.1
