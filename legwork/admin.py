from django.contrib import admin
from django.contrib.auth.admin import UserAdmin

from legwork.models import User


@admin.register(User)
class LegworkUserAdmin(UserAdmin):
    fieldsets = [*UserAdmin.fieldsets, ("Legwork", {"fields": ["role", "stamp"]})]
    list_display = ["username", "first_name", "last_name", "role", "is_active"]
    list_filter = ["role", "is_active"]
