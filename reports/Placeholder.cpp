namespace starcensus::reports {}
