"""visibility"""
