word,pronunciation
quay,K IY1
