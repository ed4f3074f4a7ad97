package edgefind

// tilePx is the side of the tiles over which the local threshold is set,
// in coarse pixels.
const tilePx = 32

// minTileRatio is the light/dark ratio below which a tile is taken to hold
// no edge and borrows its threshold from its neighbours.
const minTileRatio = 1.3
