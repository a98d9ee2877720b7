"""Seed entries shipped with zoo: TOML files of named cycloids (format: docs/seeds.md).

This directory is installed as the package ``zoo.seeds_data`` so that an installed zoo finds
its seeds; it holds data only.
"""
