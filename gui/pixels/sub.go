package pixels

import "image"

type imageRGBA = image.RGBA

func imageRect(r Rect) image.Rectangle { return image.Rect(r.X0, r.Y0, r.X1, r.Y1) }
