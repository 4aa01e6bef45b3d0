"""environment"""
