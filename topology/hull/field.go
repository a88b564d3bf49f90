package hull

// Field is the prime p of the coefficient field Z/p in which the analysis
// computes its barcodes and reads its loops.
const Field = cocyclePrime
