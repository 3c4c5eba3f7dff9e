// placeholder until the app lands
