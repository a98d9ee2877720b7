"""Pictures of cycloids: page layout, the views, and drawing them."""
