! species.f90: a Fortran host choosing its tracked elements by symbol
! through ejecta_mod and naming the species codes back.
program species
  use, intrinsic :: iso_c_binding
  use ejecta_mod
  implicit none
  type(ejecta_config) :: config
  integer(c_int64_t) :: ctx
  integer(c_int32_t) :: count, k
  character(kind=c_char) :: buf(16)
  character(len=:), allocatable :: list
  integer :: i
  ctx = 0
  if (ejecta_config_defaults(config) /= EJECTA_OK) stop 1
  if (ejecta_create(config, ctx, buf, int(size(buf), c_int64_t)) /= EJECTA_OK) stop 1
  if (ejecta_choose_species(ctx, 'Fe,O' // c_null_char) /= EJECTA_OK) stop 1
  if (ejecta_species_count(ctx, count) /= EJECTA_OK) stop 1
  list = ''
  do k = 0, count - 1
     if (ejecta_species_symbol(ctx, k, buf, int(size(buf), c_int64_t)) /= EJECTA_OK) stop 1
     do i = 1, size(buf)
        if (buf(i) == c_null_char) exit
        list = list // buf(i)
     end do
     if (k < count - 1) list = list // ','
  end do
  print '(a,i0)', 'chosen_count=', count
  print '(a,a)', 'chosen=', list
  if (ejecta_destroy(ctx) /= EJECTA_OK) stop 1
  print '(a)', 'result pass'
end program species
