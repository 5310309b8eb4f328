"""Pure physics models: one published model per function, arrays over the wavelength axis.

Nothing in this package knows about YAML, configs or the command line.
"""
