"""thermal"""
