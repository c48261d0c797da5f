# Copies IN to OUT with the first digit after "2.50290787" in the file changed (5 -> 6).
file(READ ${IN} text)
string(REPLACE "2.50290787509" "2.50290787609" text "${text}")
file(WRITE ${OUT} "${text}")
