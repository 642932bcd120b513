// placeholder; filled in by the domain's work
