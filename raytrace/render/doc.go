// Package render draws pictures of a model and its results with the
// project's own BVH: a perspective view whose primary rays are traced
// through bvh.Tree, shaded by the angle between each facet and the view,
// coloured by surface, by side (to spot flipped normals) or by a result
// field through a perceptually uniform, colour-blind-safe colour map; and a
// heat map of a view-factor matrix. Legends, colour bars and labels are
// drawn with the Go fonts (golang.org/x/image).
package render
