"""templates"""
