# a file with only comments
# and nothing else
