namespace starcensus::census {}
